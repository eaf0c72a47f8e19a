// The span of water's real index relative to air over every input the service accepts, so that flattened drops'
// scattering planes can be traced at refractive-index nodes fixed once for all requests (lib/bow/shaped-rows.ts).

/**
 * Extremes of waterIndex(...).nRelativeToAir (IAPWS R9-97 at the Kell 1975 density, Quan & Fry 1995's salinity
 * increment, Ciddor 1996 air: lib/water/water-index.ts) over vacuum wavelengths 360–830 nm (a request's spectral
 * range), water at −10–100 °C and salinity 0–35 PSU (salt water only at 400–700 nm): scanned every 1 nm and 1 °C,
 * the least is 1.313359 (830 nm, 100 °C, fresh water), the greatest 1.351569 (400 nm, −6 °C, 35 PSU); rounded
 * outwards to 1e-4. test/lib/water/index-range.test.ts repeats the scan.
 */
export const WATER_INDEX_RANGE = { min: 1.3133, max: 1.3516 } as const;
