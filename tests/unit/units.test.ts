import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  celsiusDeltaToFahrenheit,
  celsiusToFahrenheit,
  cmToInches,
  cubicFeetToLitres,
  fahrenheitToCelsius,
  formatLength,
  formatMass,
  formatNumber,
  formatPercent,
  formatTemperature,
  formatTemperatureRate,
  formatVolume,
  inchesToCm,
  kgToLb,
  lbToKg,
  litresToUsGallons,
  massToKg,
  temperatureToCelsius,
  usGallonsToLitres,
} from "@/lib/domain/units";

describe("exact definitions", () => {
  it("a pound is 0.45359237 kg", () => {
    // UK Weights and Measures Act 1963 s.1(1), international pound (quoted in a secondary copy, V-2nd)
    expect(lbToKg(1)).toBe(0.45359237);
    expect(lbToKg(100)).toBeCloseTo(45.359237, 12);
    expect(kgToLb(0.45359237)).toBe(1);
  });

  it("a US gallon is 231 cubic inches", () => {
    // NIST Handbook 44 App. C: 1 gal (U.S.) = 231 in³ exactly; 1 in = 2.54 cm exactly
    const litresFromCubicInches = (231 * 2.54 ** 3) / 1000;
    expect(usGallonsToLitres(1)).toBeCloseTo(litresFromCubicInches, 12);
    expect(usGallonsToLitres(1)).toBeCloseTo(3.785411784, 12);
  });

  it("a cubic foot is (0.3048 m)³", () => {
    // 1 ft = 0.3048 m from the yard of 0.9144 m, UK Weights and Measures Act 1963 s.1(1) (V-2nd)
    expect(cubicFeetToLitres(1)).toBeCloseTo(304.8 ** 3 / 1e6, 9);
    expect(cubicFeetToLitres(1)).toBeCloseTo(28.316846592, 9);
  });

  it("an inch is 2.54 cm", () => {
    expect(inchesToCm(1)).toBe(2.54);
    expect(cmToInches(10.16)).toBeCloseTo(4, 12);
  });

  it("water freezes at 32 °F and boils at 212 °F", () => {
    expect(celsiusToFahrenheit(0)).toBe(32);
    expect(celsiusToFahrenheit(100)).toBe(212);
    expect(fahrenheitToCelsius(-40)).toBe(-40);
    // NC State Extension: 59–77 °F is 15–25 °C
    expect(fahrenheitToCelsius(59)).toBeCloseTo(15, 12);
    expect(fahrenheitToCelsius(77)).toBeCloseTo(25, 12);
  });

  it("a rate converts without the 32 °F offset", () => {
    expect(celsiusDeltaToFahrenheit(1)).toBeCloseTo(1.8, 12);
    expect(celsiusDeltaToFahrenheit(0)).toBe(0);
  });

  it("conversions round-trip", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), (x) => {
        expect(fahrenheitToCelsius(celsiusToFahrenheit(x))).toBeCloseTo(x, 6);
        expect(kgToLb(lbToKg(x))).toBeCloseTo(x, 6);
        expect(litresToUsGallons(usGallonsToLitres(x))).toBeCloseTo(x, 6);
        expect(cmToInches(inchesToCm(x))).toBeCloseTo(x, 6);
      }),
    );
  });
});

describe("display by farm setting", () => {
  it("formats temperature in the farm's units", () => {
    expect(formatTemperature(24.5, "metric")).toBe("24.5 °C");
    expect(formatTemperature(24.5, "imperial")).toBe("76.1 °F");
    expect(formatTemperature(24.5, "metric", { digits: 0 })).toBe("25 °C");
  });

  it("formats mass, volume and length", () => {
    expect(formatMass(10, "metric")).toBe("10.0 kg");
    expect(formatMass(10, "imperial")).toBe("22.0 lb");
    expect(formatVolume(3.785411784, "imperial")).toBe("1.0 US gal");
    expect(formatVolume(20, "metric")).toBe("20.0 L");
    expect(formatLength(10, "imperial")).toBe("3.9 in");
    expect(formatPercent(77.4)).toBe("77 %");
  });

  it("shows the sign of a rate and never -0", () => {
    expect(formatTemperatureRate(1.54, "metric")).toBe("+1.5 °C/h");
    expect(formatTemperatureRate(-1, "imperial")).toBe("-1.8 °F/h");
    expect(formatTemperatureRate(-0.01, "metric")).toBe("0.0 °C/h");
    expect(formatNumber(-0.04)).toBe("0.0");
  });

  it("shows a dash instead of NaN or Infinity", () => {
    expect(formatTemperature(Number.NaN, "metric")).toBe("—");
    expect(formatMass(Number.POSITIVE_INFINITY, "imperial")).toBe("—");
    expect(formatTemperatureRate(Number.NaN, "metric")).toBe("—");
  });

  it("reads entered values back into stored units", () => {
    expect(temperatureToCelsius(77, "imperial")).toBeCloseTo(25, 12);
    expect(temperatureToCelsius(25, "metric")).toBe(25);
    expect(massToKg(2, "imperial")).toBeCloseTo(0.90718474, 12);
  });
});
