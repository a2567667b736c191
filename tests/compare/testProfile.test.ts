import { describe, expect, it } from "vitest";
import {
  parseProfile,
  powerLawArea,
  profileLevel,
  profileMotion,
  type TestProfile,
} from "../../src/compare/testProfile.js";

function profile(points: object[], extra: object = {}): TestProfile {
  const pts = points as { hz: number }[];
  const doc = {
    title: "test",
    units: "g2/Hz",
    points,
    tolerance: { bands: [{ fromHz: pts[0]!.hz, toHz: pts[pts.length - 1]!.hz, upperDb: 3, lowerDb: 3 }], rmsDb: 1 },
    ...extra,
  };
  return parseProfile(JSON.stringify(doc), "p.json");
}

/** Dense trapezoid integration on a log grid, as an independent check of the closed form. */
function numericRms(p: TestProfile, weight = (_f: number) => 1): number {
  const f0 = p.breakpoints[0]!.hz;
  const f1 = p.breakpoints[p.breakpoints.length - 1]!.hz;
  const n = 400000;
  let s = 0;
  let fa = f0;
  let ga = profileLevel(p, fa) * weight(fa);
  for (let i = 1; i <= n; i++) {
    const fb = f0 * Math.pow(f1 / f0, i / n);
    const gb = profileLevel(p, Math.min(fb, f1)) * weight(fb);
    s += 0.5 * (ga + gb) * (fb - fa);
    fa = fb;
    ga = gb;
  }
  return Math.sqrt(s);
}

describe("profile arithmetic", () => {
  it("NAVMAT P-9492 screening spectrum: 6.0582 g (docs/REFERENCES.md sec. 5; NAVMAT P-9492 prints 'Overall Grms = 6.0')", () => {
    const p = profile([
      { hz: 20, level: 0.01 },
      { hz: 80, level: 0.04 },
      { hz: 350, level: 0.04 },
      { hz: 2000, level: 0.007 },
    ]);
    expect(p.rms).toBeCloseTo(6.0582, 4);
    expect(Number.isFinite(p.segments[2]!.area)).toBe(true);
    expect(p.segments[2]!.exponent).toBeCloseTo(-1, 2);
    expect(p.segments.map((s) => s.area)).toEqual([
      expect.closeTo(1.5, 10),
      expect.closeTo(10.8, 10),
      expect.closeTo(24.4016, 4),
    ]);
    expect(p.segments[0]!.slopeDbPerOctave).toBeCloseTo(3.0103, 4);
    expect(Math.abs(numericRms(p) / p.rms - 1)).toBeLessThan(1e-6);
  });
  it("NASA-STD-7001 workmanship level: 6.784 g (overall 6.8 grms confirmed; breakpoints from memory, docs/REFERENCES.md sec. 5)", () => {
    const p = profile([
      { hz: 20, level: 0.01 },
      { hz: 80, level: 0.04 },
      { hz: 500, level: 0.04 },
      { hz: 2000, level: 0.01 },
    ]);
    expect(p.rms).toBeCloseTo(6.784, 3);
  });
  it("invented profiles C and D: 8.4862 g and 3.5236 g (computed, docs/REFERENCES.md sec. 5)", () => {
    expect(
      profile([
        { hz: 20, level: 0.005 },
        { hz: 100, level: 0.05 },
        { hz: 1000, level: 0.05 },
        { hz: 2000, level: 0.0125 },
      ]).rms,
    ).toBeCloseTo(8.4862, 4);
    const d = profile([
      { hz: 10, level: 0.001 },
      { hz: 40, level: 0.02 },
      { hz: 300, level: 0.02 },
      { hz: 1500, level: 0.002 },
    ]);
    expect(d.rms).toBeCloseTo(3.5236, 4);
    expect(d.segments.map((s) => s.slopeDbPerOctave)).toEqual([
      expect.closeTo(6.5052, 3),
      expect.closeTo(0, 9),
      expect.closeTo(-4.3068, 3),
    ]);
  });
  it("levels given by slope: exactly +-3 dB/oct from the plateau gives ends 0.010048 / 0.0070419 and 6.064 g (docs/REFERENCES.md sec. 5)", () => {
    const p = profile([
      { hz: 20, level: 0.010048 },
      { hz: 80, slopeDbPerOctave: 3 },
      { hz: 350, level: 0.04 },
      { hz: 2000, slopeDbPerOctave: -3 },
    ]);
    expect(p.breakpoints[1]!.level).toBeCloseTo(0.04, 5);
    expect(p.breakpoints[3]!.level).toBeCloseTo(0.0070419, 7);
    expect(p.rms).toBeCloseTo(6.064, 3);
  });
  it("powerLawArea handles n = -1 and n near -1 continuously", () => {
    const exact = powerLawArea(350, 2000, 0.04, -1);
    expect(powerLawArea(350, 2000, 0.04, -1 + 1e-7)).toBeCloseTo(exact, 5);
    expect(powerLawArea(350, 2000, 0.04, -1 - 1e-7)).toBeCloseTo(exact, 5);
  });
  it("flat 0.04 g2/Hz 20-2000 Hz: 8.8994 g, 69.45 mm/s, 0.3207 mm RMS (closed forms, docs/REFERENCES.md sec. 6)", () => {
    const p = profile([
      { hz: 20, level: 0.04 },
      { hz: 2000, level: 0.04 },
    ]);
    const m = profileMotion(p);
    expect(p.rms).toBeCloseTo(8.8994, 4);
    expect(m.velocityRms * 1000).toBeCloseTo(69.45, 2);
    expect(m.displacementRms * 1000).toBeCloseTo(0.3207, 4);
    expect(m.displacementPeakToPeak).toBeCloseTo(6 * m.displacementRms, 15);
  });
  it("NAVMAT P-9492 velocity 52.56 mm/s and displacement 0.1943 mm RMS (numerical, docs/REFERENCES.md sec. 6)", () => {
    const p = profile([
      { hz: 20, level: 0.01 },
      { hz: 80, level: 0.04 },
      { hz: 350, level: 0.04 },
      { hz: 2000, level: 0.007 },
    ]);
    const m = profileMotion(p);
    expect(m.velocityRms * 1000).toBeCloseTo(52.56, 1);
    expect(m.displacementRms * 1000).toBeCloseTo(0.1943, 3);
    const g = 9.80665;
    expect(numericRms(p, (f) => (g * g) / (2 * Math.PI * f) ** 4) / m.displacementRms).toBeCloseTo(1, 5);
  });
  it("(m/s2)2/Hz profiles give velocity without the g factor", () => {
    const p = profile(
      [
        { hz: 20, level: 0.04 * 9.80665 ** 2 },
        { hz: 2000, level: 0.04 * 9.80665 ** 2 },
      ],
      { units: "(m/s2)2/Hz" },
    );
    expect(p.units).toBe("m/s2");
    expect(profileMotion(p).velocityRms * 1000).toBeCloseTo(69.45, 2);
  });
  it("profileLevel interpolates on log-log axes and is NaN outside the range", () => {
    const p = profile([
      { hz: 20, level: 0.01 },
      { hz: 80, level: 0.04 },
    ]);
    expect(profileLevel(p, 40)).toBeCloseTo(0.02, 12);
    expect(profileLevel(p, 19.99)).toBeNaN();
    expect(profileLevel(p, 80)).toBeCloseTo(0.04, 15);
  });
  it("a two-column CSV of breakpoints is accepted (default +-3 dB band, +-1.5 dB RMS), and says so", () => {
    const p = parseProfile("hz,level\n20,0.01\n80,0.04\n350,0.04\n2000,0.007\n", "p.csv");
    expect(p.rms).toBeCloseTo(6.0582, 4);
    expect(p.bands).toEqual([{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }]);
    expect(p.defaultsApplied.join(" ")).toMatch(/±3 dB.*±1.5 dB/);
  });
  it("a CSV profile with semicolons and decimal commas reads the same", () => {
    const a = parseProfile("hz;level\n20;0,01\n80;0,04\n350;0,04\n2000;0,007\n", "p.csv");
    expect(a.rms).toBeCloseTo(6.0582, 4);
    expect(a.breakpoints[1]).toEqual({ hz: 80, level: 0.04 });
  });
});

describe("mixed-mode profiles (tones)", () => {
  const flatPts = [
    { hz: 10, level: 0.01 },
    { hz: 1000, level: 0.01 },
  ];

  it("tones: total RMS = sqrt(random^2 + sum peak^2 / 2); velocity and stroke include each tone in closed form", () => {
    const p = profile(flatPts, {
      tones: [
        { hz: 20, peak: 2, toleranceDb: 1 },
        { hz: 200, peak: 1, upperDb: 1, lowerDb: 2, toleranceHz: 1 },
      ],
    });
    expect(p.tones.map((t) => [t.hz, t.peak, t.upperDb, t.lowerDb, t.toleranceHz])).toEqual([
      [20, 2, 1, 1, 0.1],
      [200, 1, 1, 2, 1],
    ]);
    // Random 0.01 g^2/Hz over 990 Hz = 9.9 g^2; tones 2 + 0.5 g^2.
    expect(p.rms).toBeCloseTo(Math.sqrt(9.9), 12);
    expect(p.totalRms).toBeCloseTo(Math.sqrt(9.9 + 2 + 0.5), 12);
    const g = 9.80665;
    const random = profileMotion(profile(flatPts));
    const m = profileMotion(p);
    // A sine of peak A at f: velocity peak A/(2 pi f), displacement peak A/(2 pi f)^2 (common practice).
    const v = (a: number, f: number) => (a * g) / (2 * Math.PI * f);
    const d = (a: number, f: number) => (a * g) / (2 * Math.PI * f) ** 2;
    expect(m.velocityRms).toBeCloseTo(Math.sqrt(random.velocityRms ** 2 + v(2, 20) ** 2 / 2 + v(1, 200) ** 2 / 2), 12);
    expect(m.displacementRms).toBeCloseTo(
      Math.sqrt(random.displacementRms ** 2 + d(2, 20) ** 2 / 2 + d(1, 200) ** 2 / 2),
      12,
    );
    expect(m.displacementPeakToPeak).toBeCloseTo(6 * random.displacementRms + 2 * d(2, 20) + 2 * d(1, 200), 12);
    // The sine formula against its known answer: 1 g peak at 10 Hz moves 2.484 mm peak (docs/REFERENCES.md sec. 6).
    expect(d(1, 10) * 1000).toBeCloseTo(2.484, 3);
  });
});

describe("the arithmetic stays finite (issue #12)", () => {
  const codeOf = (f: () => unknown) => {
    try {
      f();
    } catch (e) {
      return (e as { code?: string }).code;
    }
    return "none";
  };

  it("levels and slopes that overflow the arithmetic are PROFILE_INVALID naming the point, never a NaN RMS", () => {
    const json = (points: unknown[]) =>
      JSON.stringify({
        title: "t",
        units: "g2/Hz",
        points,
        tolerance: { bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }], rmsDb: 1.5 },
      });
    const e1 = (() => {
      try {
        parseProfile(
          json([
            { hz: 20, level: 1e308 },
            { hz: 2000, level: 1e308 },
          ]),
          "a.json",
        );
      } catch (e) {
        return e as Error;
      }
    })();
    expect(e1?.message).toMatch(/points\[1\].*\[PROFILE_INVALID\]/);
    expect(
      codeOf(() =>
        parseProfile(
          json([
            { hz: 20, level: 0.01 },
            { hz: 2000, slopeDbPerOctave: 1e6 },
          ]),
          "b.json",
        ),
      ),
    ).toBe("PROFILE_INVALID");
    expect(
      codeOf(() =>
        parseProfile(
          json([
            { hz: 20, level: 0.01 },
            { hz: 2000, slopeDbPerOctave: -1e6 },
          ]),
          "c.json",
        ),
      ),
    ).toBe("PROFILE_INVALID");
    const ok = parseProfile(
      json([
        { hz: 20, level: 0.01 },
        { hz: 2000, slopeDbPerOctave: -6 },
      ]),
      "d.json",
    );
    expect(Number.isFinite(ok.rms)).toBe(true);
  });
});
