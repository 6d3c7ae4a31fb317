/**
 * Writes the invented demo surveys in sample-surveys/ (run: npm run build && node
 * dist/tests/tools/make-sample-surveys.js). First arrivals come from the test-side oracles — the
 * ray-geometry oracle (explicit ray paths through plane horizontal layers) and, for the undulating
 * bedrock, the fine-grid shortest-path oracle (tests/oracles/grid-first-arrivals.ts) — plus seeded
 * Gaussian pick noise, rounded as a seismograph display would be. Demo data only: no test treats
 * these as truth beyond the golden-file regression guard.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { seededNormal } from '../../lib/random.js';
import { gridFirstArrivals } from '../oracles/grid-first-arrivals.js';
import { geodesicDirect, geodesicInverse } from '../../lib/geodesy/geodesic.js';
import { sphericalBranchTime } from '../../lib/model/spherical-earth.js';

interface Scenario {
  readonly file: string;
  readonly title: string[];
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
  readonly receivers: readonly number[];
  readonly shots: readonly { id: string; x: number }[];
  readonly noiseMs: number;
  readonly sigmaMs: number;
  readonly receiverIds: boolean;
  readonly seed: number;
}

const range = (count: number, first: number, step: number) => Array.from({ length: count }, (_, k) => first + k * step);

const SCENARIOS: readonly Scenario[] = [
  {
    file: 'millbrook-quarry-bedrock.csv',
    title: [
      'Millbrook quarry extension, seismic line A (invented demo survey)',
      'Soil over glacial till over granite; 48 geophones at 1.5 m, five shots (two off-end).',
    ],
    velocities: [420, 1350, 4300],
    thicknesses: [2.5, 7.5],
    receivers: range(48, 1.5, 1.5),
    shots: [
      { id: 'A-OFF-W', x: -12 },
      { id: 'A-W', x: 0 },
      { id: 'A-MID', x: 36.75 },
      { id: 'A-E', x: 73.5 },
      { id: 'A-OFF-E', x: 85.5 },
    ],
    noiseMs: 0.25,
    sigmaMs: 0.3,
    receiverIds: false,
    seed: 20261,
  },
  {
    file: 'fenwick-meadow-water-table.csv',
    title: [
      'Fenwick Meadow pumping-station site, line 2 (invented demo survey)',
      'Dry sand over water-saturated sand over shale; 36 geophones at 2 m, three shots.',
    ],
    velocities: [480, 1520, 2900],
    thicknesses: [3.2, 8.0],
    receivers: range(36, 1, 2),
    shots: [
      { id: 'F1', x: 0 },
      { id: 'F2', x: 36 },
      { id: 'F3', x: 72 },
    ],
    noiseMs: 0.3,
    sigmaMs: 0.35,
    receiverIds: true,
    seed: 20262,
  },
];

function writeScenario(scenario: Scenario, folder: string): void {
  const noise = seededNormal(scenario.seed);
  const header = scenario.receiverIds
    ? 'shot,receiver,source_x_m,receiver_x_m,time_ms,sigma_ms'
    : 'shot,source_x_m,receiver_x_m,time_ms,sigma_ms';
  const lines = [...scenario.title.map((line) => `# ${line}`), header];
  for (const shot of scenario.shots) {
    scenario.receivers.forEach((receiverX, k) => {
      const offset = Math.abs(receiverX - shot.x);
      if (offset === 0) return;
      const { time } = firstArrivalByRays(scenario.velocities, scenario.thicknesses, offset);
      const picked = Math.max(0, time * 1000 + scenario.noiseMs * noise());
      const cells = [shot.id];
      if (scenario.receiverIds) cells.push(`G${String(k + 1).padStart(2, '0')}`);
      cells.push(String(shot.x), String(receiverX), picked.toFixed(2), String(scenario.sigmaMs));
      lines.push(cells.join(','));
    });
  }
  writeFileSync(join(folder, scenario.file), `${lines.join('\n')}\n`);
}

/**
 * Ashcombe Hollow: a reversed line of three overlapping spreads over bedrock whose depth undulates
 * (10 ± 3 m, wavelength 120 m), each spread shot at both ends and 30 m off each end.
 */
function writeUndulatingBedrock(folder: string): void {
  const bedrock = (x: number) => 10 + 3 * Math.sin((2 * Math.PI * (x - 20)) / 120);
  const shots = [0, 90, 180].flatMap((start, k) => {
    const receivers = range(48, start, 2.5);
    const first = receivers[0]!;
    const last = receivers[receivers.length - 1]!;
    const spread = `S${k + 1}`;
    return [
      { id: `${spread}-OFF-W`, x: first - 30, receivers },
      { id: `${spread}-W`, x: first, receivers },
      { id: `${spread}-E`, x: last, receivers },
      { id: `${spread}-OFF-E`, x: last + 30, receivers },
    ];
  });
  const arrivals = gridFirstArrivals({ section: { velocities: [650, 3200], interfaces: [bedrock] }, shots, depthExtent: 18 });
  const noise = seededNormal(20263);
  const lines = [
    '# Ashcombe Hollow bypass cutting, line B (invented demo survey)',
    '# Weathered mudstone over sandstone whose top undulates; three overlapping spreads of 48 geophones at 2.5 m,',
    '# each shot at both ends and 30 m off each end (12 shots).',
    'shot,source_x_m,receiver_x_m,time_ms,sigma_ms',
  ];
  for (const arrival of arrivals) {
    const picked = Math.max(0, arrival.time * 1000 + 0.3 * noise());
    lines.push([arrival.shot, String(arrival.sourceX), String(arrival.receiverX), picked.toFixed(2), '0.35'].join(','));
  }
  writeFileSync(join(folder, 'ashcombe-hollow-undulating-bedrock.csv'), `${lines.join('\n')}\n`);
}

/**
 * A crustal refraction profile over an invented region: five explosions along a 480 km line and 97
 * stations every 5 km (positions WGS84, a few hundred metres of scatter off the line, one station
 * 13 km off it), first arrivals in a sphere of constant-velocity shells (crust 6.25 km/s over a
 * mantle of 8.05 km/s, Moho at 38 km; lib/model/spherical-earth.ts, checked against the 10.2 case
 * and scipy), plus a time term at every shot and station for the Moho rising and falling under the
 * line (±1.5 km over 160 km: δ = ΔH·√(1/V_c² − 1/V_m²)), plus 60 ms of seeded pick noise.
 */
function writeCrustalProfile(folder: string): void {
  const crust = 6250;
  const mantle = 8050;
  const moho = 38_000;
  const model = { velocities: [crust, mantle], thicknesses: [moho], radius: 6_371_008.8 };
  const q = Math.sqrt(crust ** -2 - mantle ** -2);
  const mohoAt = (along: number) => moho + 1500 * Math.sin((2 * Math.PI * along) / 160_000);
  const start = { lat: 61.42, lon: 11.85 };
  const azimuth = 71.5;
  const noise = seededNormal(2026_12);
  const scatter = seededNormal(61);
  const place = (along: number, off: number) => {
    const onLine = geodesicDirect(start.lat, start.lon, azimuth, along);
    return off === 0 ? onLine : geodesicDirect(onLine.lat, onLine.lon, onLine.azimuth2 + 90, off);
  };
  const shots = [0, 120, 240, 360, 480].map((km, k) => ({ id: `VX${k + 1}`, along: km * 1000, ...place(km * 1000, 0) }));
  const stations = range(97, 0, 5).map((km, k) => {
    const off = k === 47 ? 13_000 : 250 * scatter();
    return { id: `VM${String(k + 1).padStart(3, '0')}`, along: km * 1000, ...place(km * 1000, off) };
  });
  const lines = [
    '# Vellmark Highlands crustal profile VX-26 (invented demo survey)',
    '# Five borehole explosions along 480 km, 97 three-component stations every 5 km (station VM048 set 13 km off the line);',
    '# times are first arrivals read on the vertical component; positions WGS84 decimal degrees.',
    '# branch: the phase as read on the records, 1 = Pg (crustal), 2 = Pn (mantle head wave).',
    'shot,source_lat,source_lon,receiver,receiver_lat,receiver_lon,time_s,sigma_s,branch',
  ];
  for (const shot of shots) {
    for (const station of stations) {
      const { distance } = geodesicInverse(shot.lat, shot.lon, station.lat, station.lon);
      if (distance < 1000) continue;
      const pg = sphericalBranchTime(model, 1, distance);
      const pn = sphericalBranchTime(model, 2, distance);
      const delayed = pn === null ? null : pn + (mohoAt(shot.along) - moho) * q + (mohoAt(station.along) - moho) * q;
      const phase = delayed !== null && (pg === null || delayed < pg) ? 2 : 1;
      const picked = (phase === 2 ? delayed! : pg!) + 0.06 * noise();
      lines.push([shot.id, shot.lat.toFixed(6), shot.lon.toFixed(6), station.id, station.lat.toFixed(6), station.lon.toFixed(6), picked.toFixed(3), '0.06', String(phase)].join(','));
    }
  }
  writeFileSync(join(folder, 'vellmark-crustal-profile.csv'), `${lines.join('\n')}\n`);
}

const folder = process.argv[2] ?? 'sample-surveys';
for (const scenario of SCENARIOS) writeScenario(scenario, folder);
writeUndulatingBedrock(folder);
writeCrustalProfile(folder);
