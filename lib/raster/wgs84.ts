// WGS84 defining parameters, NIMA TR8350.2 (3rd ed., 2000), Table 3.1.
export const WGS84_A = 6378137; // semi-major axis, m
export const WGS84_F = 1 / 298.257223563; // flattening
export const WGS84_E2 = WGS84_F * (2 - WGS84_F); // first eccentricity squared
