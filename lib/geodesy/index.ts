// Geodesics on WGS84 (Karney 2013): the inverse and direct problems, the mean Earth radius for flattening.
export {
  arcDistance,
  geodesicDirect,
  geodesicInverse,
  MEAN_EARTH_RADIUS,
  normaliseLongitude,
  WGS84_EQUATORIAL_RADIUS,
  WGS84_FLATTENING,
  type GeodesicDirect,
  type GeodesicInverse,
} from './geodesic.js';

// The best-fitting profile line through geographic points: along-line positions and off-line distances.
export {
  profileLine,
  type GeographicPoint,
  type LineOrientation,
  type LinePoint,
  type ProfileLine,
  type ProfileLineOptions,
} from './profile-line.js';

// Geographic pick sets onto that line, with geodesic offsets, a placement report and off-line warnings.
export {
  OFF_LINE_FRACTION,
  OFF_LINE_MAXIMUM,
  placeOnLine,
  type LinePlacement,
  type LineSummary,
  type PlaceOnLineOptions,
  type ShotPlacement,
  type StationOffLineWarning,
  type StationPlacement,
} from './place-on-line.js';
