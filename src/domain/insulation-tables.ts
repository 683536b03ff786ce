/**
 * Published insulation-resistance tables, kept as data so screens can show them and
 * tests can check them row by row. Where each value comes from is in the test file
 * tests/domain/insulation.test.ts.
 */

export interface NetaCorrectionRow {
  temperatureC: number;
  /** Multiplier to 20 °C for apparatus containing immersed oil insulation. */
  oil: number;
  /** Multiplier to 20 °C for apparatus containing solid insulation. */
  solid: number;
}

/**
 * NETA ATS / MTS insulation-resistance temperature-correction multipliers to 20 °C
 * (table numbered 100.14 in the editions we know), −10 °C to 110 °C in 5 °C steps.
 * Oil column 0–75 °C as published by a Megger-derived correction table (see tests);
 * the solid column and the rows below 0 °C and above 75 °C are from memory.
 */
export const NETA_TEMPERATURE_CORRECTION: readonly NetaCorrectionRow[] = [
  { temperatureC: -10, oil: 0.125, solid: 0.25 },
  { temperatureC: -5, oil: 0.18, solid: 0.32 },
  { temperatureC: 0, oil: 0.25, solid: 0.4 },
  { temperatureC: 5, oil: 0.36, solid: 0.5 },
  { temperatureC: 10, oil: 0.5, solid: 0.63 },
  { temperatureC: 15, oil: 0.74, solid: 0.81 },
  { temperatureC: 20, oil: 1.0, solid: 1.0 },
  { temperatureC: 25, oil: 1.4, solid: 1.25 },
  { temperatureC: 30, oil: 1.98, solid: 1.58 },
  { temperatureC: 35, oil: 2.8, solid: 2.0 },
  { temperatureC: 40, oil: 3.95, solid: 2.5 },
  { temperatureC: 45, oil: 5.6, solid: 3.15 },
  { temperatureC: 50, oil: 7.85, solid: 3.98 },
  { temperatureC: 55, oil: 11.2, solid: 5.0 },
  { temperatureC: 60, oil: 15.85, solid: 6.3 },
  { temperatureC: 65, oil: 22.4, solid: 7.9 },
  { temperatureC: 70, oil: 31.75, solid: 10.0 },
  { temperatureC: 75, oil: 44.7, solid: 12.6 },
  { temperatureC: 80, oil: 63.5, solid: 15.8 },
  { temperatureC: 85, oil: 89.789, solid: 20.0 },
  { temperatureC: 90, oil: 127.0, solid: 25.2 },
  { temperatureC: 95, oil: 180.0, solid: 31.6 },
  { temperatureC: 100, oil: 254.0, solid: 40.0 },
  { temperatureC: 105, oil: 359.15, solid: 50.2 },
  { temperatureC: 110, oil: 509.0, solid: 63.2 },
];

export interface NetaMinimumRow {
  /** Highest nominal equipment rating this row covers, volts (Infinity for the last). */
  maxRatedVolts: number;
  /** Minimum DC test voltage, volts. */
  testVoltsDc: number;
  /** Recommended minimum insulation resistance, megohms. */
  minMegohms: number;
}

/**
 * NETA insulation-resistance test values for electrical apparatus and systems other
 * than rotating machinery (table numbered 100.1), as printed in ANSI/NETA MTS-2019.
 * NETA's own note: representative values in the absence of consensus standards, and
 * the megohm values are at 20 °C (see the temperature-correction table).
 * Older editions (from memory) differ above 2 500 V: 5 kV 1 000 MΩ, 8 kV 2 000 MΩ,
 * 25 kV 20 000 MΩ, 34.5 kV and above tested at 15 000 V. Tideline follows MTS-2019.
 * The 450/480 V boards Tideline serves fall in the 600 V row in every edition.
 */
export const NETA_MINIMUM_INSULATION: readonly NetaMinimumRow[] = [
  { maxRatedVolts: 250, testVoltsDc: 500, minMegohms: 25 },
  { maxRatedVolts: 600, testVoltsDc: 1000, minMegohms: 100 },
  { maxRatedVolts: 1000, testVoltsDc: 1000, minMegohms: 100 },
  { maxRatedVolts: 2500, testVoltsDc: 1000, minMegohms: 500 },
  { maxRatedVolts: 5000, testVoltsDc: 2500, minMegohms: 1500 },
  { maxRatedVolts: 8000, testVoltsDc: 2500, minMegohms: 2500 },
  { maxRatedVolts: 15000, testVoltsDc: 2500, minMegohms: 5000 },
  { maxRatedVolts: 25000, testVoltsDc: 5000, minMegohms: 10000 },
  { maxRatedVolts: 34000, testVoltsDc: 5000, minMegohms: 100000 },
  { maxRatedVolts: Infinity, testVoltsDc: 5000, minMegohms: 100000 },
];
