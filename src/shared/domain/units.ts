// Unit conversions used by the facility figures. Every factor is built from exact
// definitions (the international foot, the US gallon, the IT calorie, the avoirdupois
// pound) rather than a rounded published factor, so round trips do not drift and the
// published factors become checks in the tests instead of inputs.

/** Metres in one international foot (exact by definition, 1959 agreement). */
export const METRES_PER_FOOT = 0.3048;

/** Cubic metres in one cubic foot: 0.3048³ m³ = 0.028316846592 m³ (exact). */
export const CUBIC_METRES_PER_CUBIC_FOOT = METRES_PER_FOOT ** 3;

/** Litres in one US liquid gallon: 231 in³ = 3.785411784 L (exact). */
export const LITRES_PER_US_GALLON = 3.785411784;

/**
 * Joules in one International Table British thermal unit:
 * 4.1868 J/(g·K) × 453.59237 g/lb × 5/9 K/°F = 1055.05585262 J (exact from those
 * definitions). NIST SP 811 rounds it to 1.055 056 × 10³ J.
 */
export const JOULES_PER_BTU = 1055.05585262;

/** Watts in one Btu per hour: 1055.05585262 J / 3600 s ≈ 0.29307107 W. */
export const WATTS_PER_BTU_PER_HOUR = JOULES_PER_BTU / 3600;

/** Btu per hour in one ton of refrigeration (12,000 Btu/h by definition). */
export const BTU_PER_HOUR_PER_TON_OF_REFRIGERATION = 12_000;

/** Kilowatts in one ton of refrigeration: 12,000 Btu/h ≈ 3.516853 kW. */
export const KILOWATTS_PER_TON_OF_REFRIGERATION =
  (BTU_PER_HOUR_PER_TON_OF_REFRIGERATION * WATTS_PER_BTU_PER_HOUR) / 1000;

/** Millimetres in one rack unit (1U = 1.75 in = 44.45 mm, EIA-310). */
export const MILLIMETRES_PER_RACK_UNIT = 44.45;

/** Kelvin in one degree Fahrenheit of temperature *difference* (5/9, exact). */
export const KELVIN_PER_FAHRENHEIT_DEGREE = 5 / 9;

/**
 * Converts a heat or power rate from Btu per hour to watts.
 * @param btuPerHour rate in Btu/h
 * @returns rate in W
 */
export function btuPerHourToWatts(btuPerHour: number): number {
  return btuPerHour * WATTS_PER_BTU_PER_HOUR;
}

/**
 * Converts a heat or power rate from watts to Btu per hour.
 * @param watts rate in W
 * @returns rate in Btu/h
 */
export function wattsToBtuPerHour(watts: number): number {
  return watts / WATTS_PER_BTU_PER_HOUR;
}

/**
 * Converts a heat or power rate from Btu per hour to kilowatts.
 * @param btuPerHour rate in Btu/h
 * @returns rate in kW
 */
export function btuPerHourToKW(btuPerHour: number): number {
  return btuPerHourToWatts(btuPerHour) / 1000;
}

/**
 * Converts a heat or power rate from kilowatts to Btu per hour.
 * @param kW rate in kW
 * @returns rate in Btu/h
 */
export function kWToBtuPerHour(kW: number): number {
  return wattsToBtuPerHour(kW * 1000);
}

/**
 * Converts tons of refrigeration to kilowatts (1 ton = 12,000 Btu/h).
 * @param tons cooling capacity in tons of refrigeration
 * @returns cooling capacity in kW
 */
export function tonsOfRefrigerationToKW(tons: number): number {
  return tons * KILOWATTS_PER_TON_OF_REFRIGERATION;
}

/**
 * Converts kilowatts to tons of refrigeration (1 ton = 12,000 Btu/h).
 * @param kW cooling capacity in kW
 * @returns cooling capacity in tons of refrigeration
 */
export function kWToTonsOfRefrigeration(kW: number): number {
  return kW / KILOWATTS_PER_TON_OF_REFRIGERATION;
}

/**
 * Converts Btu per hour to tons of refrigeration.
 * @param btuPerHour rate in Btu/h
 * @returns cooling capacity in tons of refrigeration
 */
export function btuPerHourToTonsOfRefrigeration(btuPerHour: number): number {
  return btuPerHour / BTU_PER_HOUR_PER_TON_OF_REFRIGERATION;
}

/**
 * Converts an airflow from cubic feet per minute to cubic metres per second.
 * @param cfm airflow in ft³/min
 * @returns airflow in m³/s
 */
export function cfmToM3PerS(cfm: number): number {
  return (cfm * CUBIC_METRES_PER_CUBIC_FOOT) / 60;
}

/**
 * Converts an airflow from cubic metres per second to cubic feet per minute.
 * @param m3PerS airflow in m³/s
 * @returns airflow in ft³/min
 */
export function m3PerSToCfm(m3PerS: number): number {
  return (m3PerS * 60) / CUBIC_METRES_PER_CUBIC_FOOT;
}

/**
 * Converts an airflow from cubic metres per hour (the usual unit on European fan and
 * air-handler sheets) to cubic metres per second.
 * @param m3PerHour airflow in m³/h
 * @returns airflow in m³/s
 */
export function m3PerHourToM3PerS(m3PerHour: number): number {
  return m3PerHour / 3600;
}

/**
 * Converts a volume from US gallons to litres.
 * @param gallons volume in US gallons
 * @returns volume in L
 */
export function usGallonsToLitres(gallons: number): number {
  return gallons * LITRES_PER_US_GALLON;
}

/**
 * Converts a volume from litres to US gallons.
 * @param litres volume in L
 * @returns volume in US gallons
 */
export function litresToUsGallons(litres: number): number {
  return litres / LITRES_PER_US_GALLON;
}

/**
 * Converts a liquid flow from US gallons per minute to litres per second.
 * @param gpm flow in US gal/min
 * @returns flow in L/s
 */
export function gpmToLitresPerSecond(gpm: number): number {
  return (gpm * LITRES_PER_US_GALLON) / 60;
}

/**
 * Converts a temperature *difference* from degrees Fahrenheit to kelvin (a ΔT, not a
 * reading: no 32° offset).
 * @param deltaF temperature difference in °F
 * @returns temperature difference in K
 */
export function fahrenheitDifferenceToKelvin(deltaF: number): number {
  return deltaF * KELVIN_PER_FAHRENHEIT_DEGREE;
}

/**
 * Converts a temperature *difference* from kelvin to degrees Fahrenheit.
 * @param deltaK temperature difference in K
 * @returns temperature difference in °F
 */
export function kelvinDifferenceToFahrenheit(deltaK: number): number {
  return deltaK / KELVIN_PER_FAHRENHEIT_DEGREE;
}

/**
 * Converts a temperature *reading* from degrees Fahrenheit to degrees Celsius.
 * @param fahrenheit temperature in °F
 * @returns temperature in °C
 */
export function fahrenheitToCelsius(fahrenheit: number): number {
  return (fahrenheit - 32) * KELVIN_PER_FAHRENHEIT_DEGREE;
}

/**
 * Converts a temperature *reading* from degrees Celsius to degrees Fahrenheit.
 * @param celsius temperature in °C
 * @returns temperature in °F
 */
export function celsiusToFahrenheit(celsius: number): number {
  return celsius / KELVIN_PER_FAHRENHEIT_DEGREE + 32;
}

/**
 * Height of a run of rack units in millimetres (EIA-310: 1U = 44.45 mm). This is the
 * mounting space only; a cabinet's outside height is larger and is on the maker's sheet.
 * @param rackUnits number of rack units (U)
 * @returns mounting height in mm
 */
export function rackUnitsToMillimetres(rackUnits: number): number {
  // Working in hundredths of a millimetre keeps 42U at exactly 1866.9, not 1866.9000000000001.
  return (rackUnits * 4445) / 100;
}

/**
 * Whole rack units that fit in a mounting height (rounded down: a part unit is no use).
 * @param millimetres mounting height in mm
 * @returns whole rack units (U)
 */
export function millimetresToWholeRackUnits(millimetres: number): number {
  // A small tolerance so 1866.9 mm (42U exactly, after float arithmetic) is not read as 41U.
  return Math.floor((millimetres * 100) / 4445 + 1e-9);
}
