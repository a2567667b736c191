import { describe, expect, it, vi } from "vitest";
import { InputError } from "../../src/errors.js";
import { readProfileSpec, type ProfileSpec } from "../../src/read/profileFile.js";

/** A profile's spec from its document (the tolerance band covering the points, RMS ±1 dB unless given). */
function profile(points: object[], extra: object = {}): ProfileSpec {
  const pts = points as { hz: number }[];
  const doc = {
    title: "test",
    units: "g2/Hz",
    points,
    tolerance: { bands: [{ fromHz: pts[0]!.hz, toHz: pts[pts.length - 1]!.hz, upperDb: 3, lowerDb: 3 }], rmsDb: 1 },
    ...extra,
  };
  return readProfileSpec(JSON.stringify(doc), "p.json");
}

describe("what a profile file states", () => {
  it("allowedOutsidePercent and outerLimits are read; outer limits must be at least as wide as the band", () => {
    const p = profile(
      [
        { hz: 20, level: 0.01 },
        { hz: 2000, level: 0.01 },
      ],
      {
        tolerance: {
          bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }],
          rmsDb: 1,
          allowedOutsidePercent: 5,
          outerLimits: [{ fromHz: 20, toHz: 2000, upperDb: 6, lowerDb: 6 }],
        },
      },
    );
    expect(p.allowedOutsidePercent).toBe(5);
    expect(p.outerBands).toEqual([{ fromHz: 20, toHz: 2000, upperDb: 6, lowerDb: 6 }]);
    const narrow = () =>
      profile(
        [
          { hz: 20, level: 0.01 },
          { hz: 2000, level: 0.01 },
        ],
        {
          tolerance: {
            bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }],
            outerLimits: [{ fromHz: 20, toHz: 2000, upperDb: 2, lowerDb: 6 }],
          },
        },
      );
    expect(narrow).toThrow(/tolerance.outerLimits\[0\]: expected outer limits at least as wide/);
    // Listed out of order, the error names the file's own entry (before: its place after sorting, outerLimits[0]).
    const unsorted = () =>
      profile(
        [
          { hz: 20, level: 0.01 },
          { hz: 2000, level: 0.01 },
        ],
        {
          tolerance: {
            bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }],
            outerLimits: [
              { fromHz: 1000, toHz: 2000, upperDb: 6, lowerDb: 6 },
              { fromHz: 20, toHz: 1000, upperDb: 2, lowerDb: 6 },
            ],
          },
        },
      );
    expect(unsorted).toThrow(/tolerance.outerLimits\[1\]: expected outer limits at least as wide .* at 20 Hz/);
  });
  it("a band limit above 100 dB names the band as the file lists it (before: its place after sorting, bands[1])", () => {
    const wide = () =>
      profile(
        [
          { hz: 20, level: 0.01 },
          { hz: 2000, level: 0.01 },
        ],
        {
          tolerance: {
            bands: [
              { fromHz: 1000, toHz: 2000, upperDb: 200, lowerDb: 3 },
              { fromHz: 20, toHz: 1000, upperDb: 3, lowerDb: 3 },
            ],
          },
        },
      );
    expect(wide).toThrow(/tolerance\.bands\[0\]\.upperDb: expected .*at most 100 dB.*\[PROFILE_INVALID\]/);
  });
  it("rmsPercent 10 becomes +0.83 / -0.92 dB (docs/REFERENCES.md sec. 7)", () => {
    const p = readProfileSpec(
      JSON.stringify({
        title: "t",
        units: "g2/Hz",
        points: [
          { hz: 10, level: 1 },
          { hz: 20, level: 1 },
        ],
        tolerance: { bands: [{ fromHz: 10, toHz: 20, upperDb: 3, lowerDb: 3 }], rmsPercent: 10 },
      }),
      "p.json",
    );
    expect(p.rmsToleranceDb!.upper).toBeCloseTo(0.83, 2);
    expect(p.rmsToleranceDb!.lower).toBeCloseTo(0.92, 2);
  });
  it("a two-column CSV profile gets the default band and RMS tolerance, and says so", () => {
    const p = readProfileSpec("hz,level\n20,0.01\n80,0.04\n350,0.04\n2000,0.007\n", "p.csv");
    expect(p.bands).toEqual([{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }]);
    expect(p.rmsToleranceDb).toEqual({ upper: 1.5, lower: 1.5 });
    expect(p.points[1]).toEqual({ hz: 80, level: 0.04 });
    expect(p.defaultsApplied.join(" ")).toMatch(/±3 dB.*±1.5 dB/);
  });
});

describe("profile validation names the key path", () => {
  const base = () => ({
    title: "t",
    units: "g2/Hz",
    points: [
      { hz: 20, level: 0.01 },
      { hz: 80, level: 0.04 },
      { hz: 350, level: 0.04 },
    ],
    tolerance: {
      bands: [
        { fromHz: 20, toHz: 100, upperDb: 3, lowerDb: 3 },
        { fromHz: 100, toHz: 350, upperDb: 6, lowerDb: 6 },
      ],
      rmsDb: 1,
    },
  });
  const cases: [string, (d: ReturnType<typeof base>) => unknown, string][] = [
    ["frequencies not increasing", (d) => ((d.points[2]!.hz = 80), d), "points[2].hz"],
    ["a non-positive level", (d) => ((d.points[1]!.level = 0), d), "points[1].level"],
    ["a negative frequency", (d) => ((d.points[0]!.hz = -5), d), "points[0].hz"],
    ["a level that is text", (d) => (((d.points[1] as Record<string, unknown>).level = "0.04"), d), "points[1].level"],
    [
      "a slope with nothing to anchor it",
      (d) => ((d.points[0] = { hz: 20, slopeDbPerOctave: 3 } as never), d),
      "points[0].level",
    ],
    ["both level and slope", (d) => (((d.points[1] as Record<string, unknown>).slopeDbPerOctave = 3), d), "points[1]"],
    ["neither level nor slope", (d) => ((d.points[1] = { hz: 80 } as never), d), "points[1]"],
    ["a single point", (d) => ((d.points = [d.points[0]!]), d), "points"],
    ["unknown units", (d) => ((d.units = "g^2/Hz"), d), "units"],
    ["no title", (d) => ((d.title = ""), d), "title"],
    ["bands that overlap", (d) => ((d.tolerance.bands[1]!.fromHz = 90), d), "tolerance.bands[1].fromHz"],
    ["bands with a gap", (d) => ((d.tolerance.bands[1]!.fromHz = 120), d), "tolerance.bands[1].fromHz"],
    ["bands that start late", (d) => ((d.tolerance.bands[0]!.fromHz = 30), d), "tolerance.bands[0].fromHz"],
    ["bands that end early", (d) => ((d.tolerance.bands[1]!.toHz = 300), d), "tolerance.bands[1].toHz"],
    ["a band that runs backwards", (d) => ((d.tolerance.bands[0]!.toHz = 10), d), "tolerance.bands[0].toHz"],
    ["a negative band limit", (d) => ((d.tolerance.bands[0]!.lowerDb = -3), d), "tolerance.bands[0].lowerDb"],
    ["no bands", (d) => ((d.tolerance.bands = []), d), "tolerance.bands"],
    ["rmsDb and rmsPercent", (d) => (((d.tolerance as Record<string, unknown>).rmsPercent = 10), d), "tolerance"],
    ["minDof zero", (d) => ({ ...d, minDof: 0 }), "minDof"],
    [
      "an allowance above 50 %",
      (d) => (((d.tolerance as Record<string, unknown>).allowedOutsidePercent = 60), d),
      "tolerance.allowedOutsidePercent",
    ],
    [
      "outer limits with a gap",
      (d) => (
        ((d.tolerance as Record<string, unknown>).outerLimits = [
          { fromHz: 20, toHz: 100, upperDb: 6, lowerDb: 6 },
          { fromHz: 120, toHz: 350, upperDb: 9, lowerDb: 9 },
        ]),
        d
      ),
      "tolerance.outerLimits[1].fromHz",
    ],
    ["not an object", () => [1, 2, 3], "(top level)"],
  ];
  for (const [name, mutate, path] of cases) {
    it(`${name}: ${path}`, () => {
      const text = JSON.stringify(mutate(base()));
      const e = (() => {
        try {
          readProfileSpec(text, "spec.json");
        } catch (x) {
          return x;
        }
      })();
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).code).toBe("PROFILE_INVALID");
      expect((e as InputError).details.keyPath).toBe(path);
      expect((e as InputError).message).toContain(`spec.json: ${path}: expected`);
    });
  }
  it("JSON syntax errors give line and column", () => {
    const e = (() => {
      try {
        readProfileSpec('{\n  "title": "t",\n  "units": g2\n}', "spec.json");
      } catch (x) {
        return x as InputError;
      }
    })()!;
    expect(e.code).toBe("PROFILE_SYNTAX");
    expect(e.details.line).toBe(3);
    expect(e.details.column).toBe(12);
  });
  it("YAML syntax errors give the line", () => {
    const e = (() => {
      try {
        readProfileSpec("title: t\npoints:\n  - { hz: 20, level: 0.01\n", "spec.yaml");
      } catch (x) {
        return x as InputError;
      }
    })()!;
    expect(e.code).toBe("PROFILE_SYNTAX");
    expect(e.details.line).toBeGreaterThan(1);
  });
  it("CSV profile rows that are not two numbers name the line", () => {
    const e = (() => {
      try {
        readProfileSpec("hz,level\n20,0.01\n80,x\n", "p.csv");
      } catch (x) {
        return x as InputError;
      }
    })()!;
    expect(e.code).toBe("PROFILE_CSV");
    expect(e.details.line).toBe(3);
  });
  const errorOf = (text: string) => {
    try {
      readProfileSpec(text, "p.csv");
    } catch (x) {
      return x as InputError;
    }
    throw new Error("no error");
  };
  it("a first row that holds a number is data, never a header: a typo there is an error, not a dropped breakpoint", () => {
    // Before: "20,0.01x" was taken for a header, the 20 Hz breakpoint dropped, the profile read as 80–2000 Hz.
    const e = errorOf("20,0.01x\n80,0.04\n2000,0.04\n");
    expect([e.code, e.details.line]).toEqual(["PROFILE_CSV", 1]);
    expect(errorOf("# lab\n20;0,01 g\n80;0,04\n2000;0,04\n").details.line).toBe(2);
    // Numbers with their units written beside them are no header either.
    expect(errorOf("20 Hz,0.01 g2/Hz\n80,0.04\n2000,0.04\n").details).toMatchObject({ line: 1 });
    // A header has no number in it; one with units still reads.
    expect(readProfileSpec("Hz,level [g2/Hz]\n20,0.01\n2000,0.01\n", "p.csv").points).toHaveLength(2);
  });
  it("CSV errors name the file's own line, counting comment and blank lines", () => {
    // Before: the line among the rows Papa kept (here 3), not the file's line 6.
    const text = "# lab profile\n\nhz,level\n20,0.01\n\n80,abc\n2000,0.04\n";
    expect([errorOf(text).code, errorOf(text).details.line]).toEqual(["PROFILE_CSV", 6]);
    expect(errorOf("# c\nHz,level [mg2/Hz]\n20,0.01\n2000,0.01\n").details).toMatchObject({ line: 2, column: 2 });
    // A breakpoint the spec refuses (level 0, a frequency not rising) names its line as well as its key.
    expect(errorOf("# c\nhz,level\n20,0.01\n\n80,0\n2000,0.04\n").details).toMatchObject({
      line: 5,
      keyPath: "points[1].level",
    });
    expect(errorOf("hz,level\n20,0.01\n80,0.04\n80,0.04\n").details).toMatchObject({
      line: 4,
      keyPath: "points[2].hz",
    });
  });
});

describe("readProfileSpec limits (issue #12)", () => {
  const yaml = (title: string, hz = "20") =>
    `title: ${title}\nunits: g2/Hz\npoints: [{hz: ${hz}, level: 0.01}, {hz: 2000, level: 0.01}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}], rmsDb: 1.5}\n`;
  const codeOf = (f: () => unknown) => {
    try {
      f();
    } catch (e) {
      return (e as { code?: string }).code;
    }
    return "none";
  };

  it("a YAML custom tag is PROFILE_SYNTAX and prints no warning (process.emitWarning, console.warn)", () => {
    const emit = vi.spyOn(process, "emitWarning");
    const warn = vi.spyOn(console, "warn");
    try {
      expect(codeOf(() => readProfileSpec(yaml('!!js/function "function () {}"'), "t.yaml"))).toBe("PROFILE_SYNTAX");
      expect(codeOf(() => readProfileSpec(yaml("!custom x"), "t.yaml"))).toBe("PROFILE_SYNTAX");
      expect(emit).not.toHaveBeenCalled();
      expect(warn).not.toHaveBeenCalled();
    } finally {
      emit.mockRestore();
      warn.mockRestore();
    }
  });

  it("hexadecimal, octal and binary numbers are refused in YAML; decimal and exponent forms are read", () => {
    for (const hz of ["0x14", "0o24"])
      expect(
        codeOf(() => readProfileSpec(yaml("t", hz), "t.yaml")),
        hz,
      ).toBe("PROFILE_INVALID");
    expect(readProfileSpec(yaml("t", "2.0e1"), "t.yaml").points[0]!.hz).toBe(20);
    expect(readProfileSpec(yaml("it's fine [a] {b}"), "t.yaml").title).toBe("it's fine [a] {b}");
  });

  it("nesting beyond 32 and text beyond 1 MiB are PROFILE_TOO_LARGE, before any parser runs", () => {
    expect(codeOf(() => readProfileSpec("[".repeat(100000) + "]".repeat(100000), "deep.json"))).toBe(
      "PROFILE_TOO_LARGE",
    );
    expect(codeOf(() => readProfileSpec(`{"title": "${"[".repeat(100)}"}`, "ok.json"))).toBe("PROFILE_INVALID");
    expect(codeOf(() => readProfileSpec(" ".repeat((1 << 20) + 1), "big.json"))).toBe("PROFILE_TOO_LARGE");
  });

  it("a CSV profile reads only decimal numbers and only the units it knows", () => {
    expect(codeOf(() => readProfileSpec("hz,level\n0x14,0.01\n2000,0.01\n", "p.csv"))).toBe("PROFILE_CSV");
    expect(codeOf(() => readProfileSpec("Hz,level [mg2/Hz]\n20,0.01\n2000,0.01\n", "p.csv"))).toBe("PROFILE_CSV");
    expect(codeOf(() => readProfileSpec("f [kHz],level\n20,0.01\n2000,0.01\n", "p.csv"))).toBe("PROFILE_CSV");
    expect(readProfileSpec("Hz,level [(m/s^2)^2/Hz]\n20,0.01\n2000,0.01\n", "p.csv").units).toBe("m/s2");
    expect(readProfileSpec("Hz [Hz],level [g²/Hz]\n20,0.01\n2000,0.01\n", "p.csv").units).toBe("g");
    expect(readProfileSpec("20,0.01\n2000,1e-2\n", "p.csv").points[1]!.level).toBe(0.01);
  });
});

describe("mixed-mode profiles (tones)", () => {
  const flatPts = [
    { hz: 10, level: 0.01 },
    { hz: 1000, level: 0.01 },
  ];
  const msgOf = (f: () => unknown) => {
    try {
      f();
    } catch (e) {
      return { code: (e as InputError).code, message: (e as Error).message };
    }
    return undefined;
  };

  it("a key psdgate does not know is PROFILE_INVALID naming the key, at the top level and inside tones, bands and points", () => {
    const top = msgOf(() => profile(flatPts, { tone: [{ hz: 50, peak: 1, toleranceDb: 1 }] }));
    expect(top?.code).toBe("PROFILE_INVALID");
    expect(top?.message).toMatch(
      /p\.json: tone: expected a key psdgate knows here \(title, units, points, .*tones.*\), received "tone"/,
    );
    const inTone = msgOf(() => profile(flatPts, { tones: [{ hz: 50, peak: 1, toleranceDb: 1, phase: 0 }] }));
    expect(inTone?.message).toMatch(/tones\[0\]\.phase.*received "phase"/);
    const inBand = msgOf(() =>
      readProfileSpec(
        JSON.stringify({
          title: "t",
          units: "g2/Hz",
          points: flatPts,
          tolerance: { bands: [{ fromHz: 10, toHz: 1000, upperDb: 3, lowerDb: 3, widthDb: 1 }] },
        }),
        "p.json",
      ),
    );
    expect(inBand?.message).toMatch(/tolerance\.bands\[0\]\.widthDb/);
    expect(
      msgOf(() =>
        profile([
          { hz: 10, level: 0.01, note: "x" },
          { hz: 1000, level: 0.01 },
        ]),
      )?.message,
    ).toMatch(/points\[0\]\.note/);
  });

  it("a tone without a tolerance, outside the profile's range, or overlapping another's allowance is PROFILE_INVALID naming it", () => {
    expect(msgOf(() => profile(flatPts, { tones: [{ hz: 50, peak: 1 }] }))?.message).toMatch(/tones\[0\].*a tolerance/);
    expect(msgOf(() => profile(flatPts, { tones: [{ hz: 5, peak: 1, toleranceDb: 1 }] }))?.message).toMatch(
      /tones\[0\]\.hz.*inside the profile's range/,
    );
    expect(
      msgOf(() =>
        profile(flatPts, {
          tones: [
            { hz: 50, peak: 1, toleranceDb: 1, toleranceHz: 2 },
            { hz: 53, peak: 1, toleranceDb: 1, toleranceHz: 2 },
          ],
        }),
      )?.message,
    ).toMatch(/tones\[1\]\.hz.*do not overlap/);
    expect(msgOf(() => profile(flatPts, { tones: [{ hz: 50, peak: -1, toleranceDb: 1 }] }))?.code).toBe(
      "PROFILE_INVALID",
    );
  });
});
