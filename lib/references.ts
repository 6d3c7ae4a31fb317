/**
 * The one bibliography of slopebreak. Doc comments cite these keys; the interpretation JSON names
 * the same keys where it says how a value was obtained, so a report can print its references.
 * Volume and page details are as commonly cited; verify before quoting.
 */
export const REFERENCES = {
  Adachi1954: 'Adachi R. 1954. On a proof of fundamental formula concerning refraction method of geophysical prospecting. Kumamoto Journal of Science A 2.',
  Allen1978: 'Allen R.V. 1978. Automatic earthquake recognition and timing from single traces. Bulletin of the Seismological Society of America 68.',
  Bellman1961: 'Bellman R. 1961. On the approximation of curves by line segments using dynamic programming. Communications of the ACM 4.',
  Bevington2003: 'Bevington P.R., Robinson D.K. 2003. Data Reduction and Error Analysis for the Physical Sciences, 3rd ed.',
  Draper1998: 'Draper N.R., Smith H. 1998. Applied Regression Analysis, 3rd ed.',
  Efron1979: 'Efron B. 1979. Bootstrap methods: another look at the jackknife. Annals of Statistics 7.',
  Efron1993: 'Efron B., Tibshirani R.J. 1993. An Introduction to the Bootstrap.',
  Hagedoorn1959: 'Hagedoorn J.G. 1959. The plus-minus method of interpreting seismic refraction sections. Geophysical Prospecting 7.',
  Holland1977: 'Holland P.W., Welsch R.E. 1977. Robust regression using iteratively reweighted least-squares. Communications in Statistics 6.',
  Huber1964: 'Huber P.J. 1964. Robust estimation of a location parameter. Annals of Mathematical Statistics 35.',
  Huber1981: 'Huber P.J. 1981. Robust Statistics.',
  Jackson2005: 'Jackson B. et al. 2005. An algorithm for optimal partitioning of data on an interval. IEEE Signal Processing Letters 12.',
  JCGM2008: 'JCGM 100:2008. Evaluation of measurement data: Guide to the expression of uncertainty in measurement.',
  Kearey2002: 'Kearey P., Brooks M., Hill I. 2002. An Introduction to Geophysical Exploration, 3rd ed.',
  KennettEngdahl1991: 'Kennett B.L.N., Engdahl E.R. 1991. Traveltimes for global earthquake location and phase identification. Geophysical Journal International 105, 429–465.',
  Orear1982: 'Orear J. 1982. Least squares when both variables have uncertainties. American Journal of Physics 50.',
  Palmer1980: 'Palmer D. 1980. The Generalized Reciprocal Method of Seismic Refraction Interpretation. Society of Exploration Geophysicists.',
  Palmer1986: 'Palmer D. 1986. Refraction Seismics. Handbook of Geophysical Exploration I, vol. 13.',
  Press2007: 'Press W.H., Teukolsky S.A., Vetterling W.T., Flannery B.P. 2007. Numerical Recipes, 3rd ed.',
  Redpath1973: 'Redpath B.B. 1973. Seismic Refraction Exploration for Engineering Site Investigations. Explosive Excavation Research Laboratory, Livermore.',
  Schwarz1978: 'Schwarz G. 1978. Estimating the dimension of a model. Annals of Statistics 6.',
  Sen1968: "Sen P.K. 1968. Estimates of the regression coefficient based on Kendall's tau. Journal of the American Statistical Association 63.",
  Sheriff1995: 'Sheriff R.E., Geldart L.P. 1995. Exploration Seismology, 2nd ed.',
  Shafranovich2005: 'Shafranovich Y. 2005. Common Format and MIME Type for Comma-Separated Values (CSV) Files. RFC 4180, IETF.',
  Soske1959: 'Soske J.L. 1959. The blind zone problem in engineering geophysics. Geophysics 24.',
  Telford1990: 'Telford W.M., Geldart L.P., Sheriff R.E. 1990. Applied Geophysics, 2nd ed.',
  Thompson2008: 'Thompson A., Taylor B.N. 2008. Guide for the Use of the International System of Units (SI). NIST Special Publication 811.',
  Theil1950: 'Theil H. 1950. A rank-invariant method of linear and polynomial regression analysis I–III. Proceedings of the Koninklijke Nederlandse Akademie van Wetenschappen 53.',
  VijayaRaghava1979: 'Vijaya Raghava M.S., Nanda Kumar G. 1979. The blind-zone problem in multiple refraction-layer overburden situations. Geophysical Prospecting 27.',
  Yergeau2003: 'Yergeau F. 2003. UTF-8, a transformation format of ISO 10646. RFC 3629, IETF.',
  Friedman1991: 'Friedman J.H. 1991. Multivariate adaptive regression splines. Annals of Statistics 19.',
  KassRaftery1995: 'Kass R.E., Raftery A.E. 1995. Bayes factors. Journal of the American Statistical Association 90.',
  Mota1954: 'Mota L. 1954. Determination of dips and depths of geological layers by the seismic refraction method. Geophysics 19.',
  Johnson1976: 'Johnson S.H. 1976. Interpretation of split-spread refraction data in terms of plane dipping layers. Geophysics 41 (title as recalled; verify).',
  Moser1991: 'Moser T.J. 1991. Shortest path calculation of seismic rays. Geophysics 56.',
  Dijkstra1959: 'Dijkstra E.W. 1959. A note on two problems in connexion with graphs. Numerische Mathematik 1.',
} as const;

export type ReferenceKey = keyof typeof REFERENCES;
