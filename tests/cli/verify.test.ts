import { copyFileSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { cli, forge, tempDir } from "../helpers.js";

// One check report made once (beside copies of its inputs); each case edits a copy of the folder.
let base: string;
beforeAll(async () => {
  base = tempDir();
  copyFileSync("samples/kb210-run-resonance.wav", join(base, "run.wav"));
  copyFileSync("samples/profiles/kb210-controller.json", join(base, "profile.json"));
  writeFileSync(join(base, "meta.json"), JSON.stringify({ testId: "KB-210-Q-0417", operator: "R. Okonkwo" }));
  const r = await cli(
    "check",
    join(base, "run.wav"),
    "-p",
    join(base, "profile.json"),
    "--meta",
    join(base, "meta.json"),
    "--report",
    join(base, "report.html"),
  );
  expect(r.code).toBe(1);
});

function copy(): string {
  const d = tempDir();
  for (const f of ["run.wav", "profile.json", "report.html"]) copyFileSync(join(base, f), join(d, f));
  return d;
}

describe("psdgate verify", () => {
  it("verify REPORT.html on an intact report and its inputs beside it: every step ok, numbers and verdict reproduced, exit 0", async () => {
    const d = copy();
    const r = await cli("verify", join(d, "report.html"));
    expect(r.code, r.stdout + r.stderr).toBe(0);
    expect(r.stdout).toMatch(/REPRODUCED/);
    expect(r.stdout).toMatch(/\d{4,} numbers and the verdict FAIL reproduced/);
    const j = JSON.parse((await cli("verify", join(d, "report.html"), "--json")).stdout);
    expect(j.status).toBe("reproduced");
    expect(j.steps.map((s: { step: string }) => s.step)).toEqual([
      "result",
      "page",
      "recording",
      "profile",
      "rerun",
      "rendered",
    ]);
    expect(r.stdout).toContain("the page is the one its re-run renders");
  });

  it("a re-signed page whose words and figures were edited (the result left alone) is caught by rendering it again", async () => {
    const d = copy();
    const html = readFileSync(join(d, "report.html"), "utf8");
    // The running header printed on every page says PASS, and the worst excursion is made smaller.
    expect(html).toContain('content: "FAIL · recording');
    const forged = forge(
      html,
      (p) => p.replace('content: "FAIL · recording', 'content: "PASS · recording').replace(/\+4\.64 dB/g, "+1.04 dB"),
      () => undefined,
    );
    writeFileSync(join(d, "report.html"), forged);
    const r = await cli("verify", join(d, "report.html"));
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/ok\s+page\s/);
    expect(r.stdout).toMatch(/ok\s+rerun\s+\d+ numbers and the verdict FAIL reproduced/);
    expect(r.stdout).toMatch(
      /FAIL\s+rendered\s+the page differs from the one its re-run renders, from line \d+: the page shows ".*PASS · recording/,
    );
    // A ride record the same way: its exposure figure on the page lowered.
    const ride = join(d, "ride.html");
    const made = await cli(
      "ride",
      "samples/marlow-uv3-ride.wav",
      "--units",
      "m/s2",
      "--scale",
      "40",
      "--axes",
      "x=1,y=2,z=3",
      "--exposure",
      "8h",
      "--report",
      ride,
    );
    expect(made.code, made.stderr).toBe(0);
    expect((await cli("verify", ride)).code).toBe(0);
    const rideHtml = readFileSync(ride, "utf8");
    const a8 = /A\(8\) (\d\.\d+) m\/s²/.exec(rideHtml)![1]!;
    writeFileSync(
      ride,
      forge(
        rideHtml,
        (p) => p.replaceAll(`${a8} m/s²`, `${(Number(a8) * 0.8).toFixed(3)} m/s²`),
        () => undefined,
      ),
    );
    const v = await cli("verify", ride);
    expect(v.code).toBe(1);
    expect(v.stdout).toMatch(/FAIL\s+rendered\s+the page differs/);
  });

  it("verify with --recording and --profile finds inputs that are not beside the report", async () => {
    const d = tempDir();
    copyFileSync(join(base, "report.html"), join(d, "report.html"));
    const r = await cli(
      "verify",
      join(d, "report.html"),
      "--recording",
      join(base, "run.wav"),
      "--profile",
      join(base, "profile.json"),
    );
    expect(r.code, r.stdout).toBe(0);
  });

  it("an edited page (a figure on the page changed) is caught: exit 1, the page step fails", async () => {
    const d = copy();
    const f = join(d, "report.html");
    const html = readFileSync(f, "utf8");
    const edited = html.replace(/9\.171&nbsp;g/, "8.486&nbsp;g");
    expect(edited).not.toBe(html);
    writeFileSync(f, edited);
    const r = await cli("verify", f);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/FAIL\s+page\s+page edited outside the result/);
    expect(r.stdout).toMatch(/DIFFERS/);
  });

  it("an edited verdict is caught, on the page and in the embedded result (the digest, and the re-run verdict)", async () => {
    const d = copy();
    const f = join(d, "report.html");
    const html = readFileSync(f, "utf8");
    writeFileSync(f, html.replace('data-verdict="fail"', 'data-verdict="pass"'));
    const page = await cli("verify", f);
    expect(page.code).toBe(1);
    expect(page.stdout).toMatch(/the page shows verdict "pass" \(class "fail", word "FAIL"\), the result says "fail"/);
    writeFileSync(
      f,
      html.replace(/(<template id="psdgate-result"[^>]*>\{[\s\S]*?)"verdict":"fail"/, '$1"verdict":"pass"'),
    );
    const block = await cli("verify", f);
    expect(block.code).toBe(1);
    expect(block.stdout).toMatch(/embedded result edited/);
    expect(block.stdout).toMatch(/the verdict re-runs as FAIL, the report says PASS/);
    expect(block.stdout).toMatch(/differs: verdict: recorded "pass", re-run "fail"/);
  });

  it("a re-signed FAIL turned PASS is caught: verdict, rule, control and channels deleted, banner attributes reordered, both digests recomputed", async () => {
    const d = copy();
    const f = join(d, "report.html");
    const html = readFileSync(f, "utf8");
    const toPass = (p: string) =>
      p
        .replace(
          '<div class="verdict fail" id="verdict" data-verdict="fail"><span class="word">FAIL</span>',
          '<div data-verdict="pass" class="verdict pass" id="verdict"><span class="word">PASS</span>',
        )
        .replace(/FAIL · recording/g, "PASS · recording");
    const strip = (doc: Record<string, unknown>) => {
      const r = doc.result as Record<string, unknown>;
      for (const k of ["verdict", "rule", "control", "channels"]) delete r[k];
    };
    writeFileSync(f, forge(html, toPass, strip));
    const v = await cli("verify", f);
    expect(v.code).toBe(1);
    expect(v.stdout).toMatch(/DIFFERS|differs/);
    expect(v.stdout).toMatch(
      /the page shows verdict "pass" \(class "pass", word "PASS"\), the result says "undefined"|no "verdict"/,
    );
    expect(v.stdout).toMatch(/the embedded result has no "verdict"/);
    // The page alone turned PASS, every attribute order and quoting: the parsed banner still says so.
    for (const banner of [
      "<div data-verdict='pass' class='verdict pass' id='verdict'>",
      '<div ID=verdict DATA-VERDICT=pass class="pass verdict">',
    ]) {
      writeFileSync(
        f,
        forge(
          html,
          (p) => p.replace('<div class="verdict fail" id="verdict" data-verdict="fail">', banner),
          () => undefined,
        ),
      );
      const w = await cli("verify", f);
      expect(w.code, banner).toBe(1);
      expect(w.stdout, banner).toMatch(/the page shows verdict "pass"/);
    }
    // Only the deleted fields, page untouched: each is a difference of the re-run, not "added later".
    writeFileSync(
      f,
      forge(
        html,
        (p) => p,
        (doc) => {
          delete (doc.result as Record<string, unknown>).control;
        },
      ),
    );
    const c = await cli("verify", f);
    expect(c.code).toBe(1);
    expect(c.stdout).toMatch(/no "control"/);
    writeFileSync(
      f,
      forge(
        html,
        (p) => p,
        (doc) => {
          delete (doc.result as { channels: Record<string, unknown>[] }).channels[0]!.lines;
        },
      ),
    );
    const l = await cli("verify", f);
    expect(l.code).toBe(1);
    expect(l.stdout).toMatch(/channels\[0\]\.lines: not in the report/);
  });

  it("a re-signed page with injected style, a second banner, a script or a style attribute is caught (the page is parsed, not matched)", async () => {
    const d = copy();
    const f = join(d, "report.html");
    const html = readFileSync(f, "utf8");
    const cases: [string, (p: string) => string, RegExp][] = [
      [
        "style element",
        (p) =>
          p.replace(
            "</head>",
            "<style>.verdict.fail .word { font-size: 0 } .verdict.fail .word::after { content: 'PASS'; font-size: 22pt }</style></head>",
          ),
        /style element psdgate did not write/,
      ],
      [
        "style inside the frame's",
        (p) =>
          p.replace("* { box-sizing: border-box; }", "* { box-sizing: border-box; } .verdict.fail { display: none }"),
        /style element psdgate did not write/,
      ],
      [
        "second banner",
        (p) =>
          p.replace(
            "<h2>Test identity</h2>",
            '<div class="verdict pass" id="verdict" data-verdict="pass"><span class="word">PASS</span></div><h2>Test identity</h2>',
          ),
        /2 verdict banners/,
      ],
      [
        "script",
        (p) => p.replace("</body>", "<script>document.querySelector('.word').textContent='PASS'</script></body>"),
        /<script> element/,
      ],
      [
        "style attribute",
        (p) => p.replace('<span class="word">FAIL</span>', '<span class="word" style="display:none">FAIL</span>'),
        /style attribute/,
      ],
      [
        "banner hidden by an attribute",
        (p) => p.replace('id="verdict" data-verdict="fail"', 'id="verdict" data-verdict="fail" hidden'),
        /hidden attribute/,
      ],
      [
        "banner inside a closed details",
        (p) =>
          p
            .replace('<div class="verdict fail"', '<details><summary></summary><div class="verdict fail"')
            .replace("<h2>Test identity</h2>", "</details><h2>Test identity</h2>"),
        /<details> element/,
      ],
      [
        "banner inside an inert template",
        (p) =>
          p
            .replace('<div class="verdict fail"', '<template><div class="verdict fail"')
            .replace("<h2>Test identity</h2>", "</template><h2>Test identity</h2>"),
        /2 <template> elements/,
      ],
      [
        "uppercase closing tag",
        (p) => p.replace("</head>", "<STYLE>.verdict{display:none}</STYLE ></head>"),
        /style element psdgate did not write/,
      ],
    ];
    for (const [what, edit, want] of cases) {
      writeFileSync(
        f,
        forge(html, edit, () => undefined),
      );
      const v = await cli("verify", f);
      expect(v.code, what).toBe(1);
      expect(v.stdout, what).toMatch(want);
    }
  });

  it("an edited recording (one sample byte changed) is caught by its SHA-256: exit 1", async () => {
    const d = copy();
    const wav = readFileSync(join(d, "run.wav"));
    wav[wav.length - 3] = wav[wav.length - 3]! ^ 0x01;
    writeFileSync(join(d, "run.wav"), wav);
    const r = await cli("verify", join(d, "report.html"));
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/FAIL\s+recording .*run\.wav: SHA-256 differs/);
    expect(r.stdout).toMatch(/not re-run/);
  });

  it("an edited profile (one level changed) is caught by its SHA-256: exit 1", async () => {
    const d = copy();
    const p = join(d, "profile.json");
    writeFileSync(p, readFileSync(p, "utf8").replace(/"level": 0\.05\b/, '"level": 0.051'));
    expect(readFileSync(p, "utf8")).not.toBe(readFileSync(join(base, "profile.json"), "utf8"));
    const r = await cli("verify", join(d, "report.html"));
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/FAIL\s+profile .*profile\.json: SHA-256 differs/);
  });

  it("a missing recording: exit 2, naming where it was looked for and the option that gives it", async () => {
    // Its own report: the recorded path must not exist either (the base copy would be found there).
    const d = tempDir();
    copyFileSync("samples/kb210-run-resonance.wav", join(d, "run.wav"));
    await cli(
      "check",
      join(d, "run.wav"),
      "-p",
      "samples/profiles/kb210-controller.json",
      "--report",
      join(d, "report.html"),
    );
    rmSync(join(d, "run.wav"));
    const r = await cli("verify", join(d, "report.html"));
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/MISSING recording run\.wav \(looked for .*run\.wav.*--recording\)/);
    expect(r.stdout).toMatch(/INPUT MISSING/);
  });

  it("a file that is not a psdgate report: exit 2, one line NOT_A_REPORT; a report that does not exist: exit 2 with FILE_UNREADABLE", async () => {
    const d = tempDir();
    writeFileSync(join(d, "x.html"), "<html><body>hello</body></html>");
    const not = await cli("verify", join(d, "x.html"));
    expect(not.code).toBe(2);
    expect(not.stderr).toMatch(/x\.html.*an HTML page with no psdgate result in it \[NOT_A_REPORT\]/);
    const none = await cli("verify", join(d, "none.html"));
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/none\.html.*\[FILE_UNREADABLE\]/);
  });

  it("a psd --report is verified the same way (intact: exit 0; edited recording: exit 1)", async () => {
    const d = tempDir();
    copyFileSync("samples/kb210-run.wav", join(d, "run.wav"));
    expect(
      (
        await cli(
          "psd",
          join(d, "run.wav"),
          "--units",
          "g",
          "--fmin",
          "20",
          "--fmax",
          "2000",
          "--report",
          join(d, "psd.html"),
        )
      ).code,
    ).toBe(0);
    const ok = await cli("verify", join(d, "psd.html"));
    expect(ok.code, ok.stdout).toBe(0);
    expect(ok.stdout).toMatch(/\(psd report\)/);
    const wav = readFileSync(join(d, "run.wav"));
    wav[wav.length - 1] = wav[wav.length - 1]! ^ 0x80;
    writeFileSync(join(d, "run.wav"), wav);
    expect((await cli("verify", join(d, "psd.html"))).code).toBe(1);
  });

  it("records written before the options family (respond's `channel`, derive's `fromHz`/`toHz`/`channel`) still re-run and reproduce", async () => {
    const d = tempDir();
    copyFileSync("samples/kb210-run.wav", join(d, "run.wav"));
    copyFileSync("samples/kb210-run-short.wav", join(d, "short.wav"));
    copyFileSync("samples/brackley-ft2-warehouse.csv", join(d, "field.csv"));
    expect(
      (
        await cli(
          "respond",
          join(d, "run.wav"),
          "--fn",
          "20:400",
          "--q",
          "10",
          "--channel",
          "2",
          "--against",
          join(d, "short.wav"),
          "--against-channel",
          "1",
          "--report",
          join(d, "r.html"),
        )
      ).code,
    ).toBe(0);
    const derived = await cli(
      "derive",
      join(d, "field.csv"),
      "--life",
      "2h",
      "--test-duration",
      "1h",
      "--fmin",
      "8",
      "--fmax",
      "300",
      "--channel",
      "1",
      "--out",
      join(d, "p.yaml"),
      "--report",
      join(d, "d.html"),
    );
    expect(derived.code, derived.stderr).toBe(0);
    const old = (file: string, edit: (rerun: Record<string, unknown>) => void) => {
      const f = join(d, file);
      writeFileSync(
        f,
        forge(
          readFileSync(f, "utf8"),
          (p) => p,
          (doc) => edit(doc.rerun as Record<string, unknown>),
        ),
      );
    };
    old("r.html", (rerun) => {
      const source = rerun.source as Record<string, unknown>;
      const against = (rerun.against as { options: Record<string, unknown> }).options;
      expect([source.channels, against.channels]).toEqual([["2"], ["1"]]);
      source.channel = "2";
      against.channel = "1";
      delete source.channels;
      delete against.channels;
    });
    old("d.html", (rerun) => {
      expect([rerun.fminHz, rerun.fmaxHz, rerun.channels]).toEqual([8, 300, ["1"]]);
      Object.assign(rerun, { fromHz: 8, toHz: 300, channel: "1" });
      delete rerun.fminHz;
      delete rerun.fmaxHz;
      delete rerun.channels;
    });
    for (const f of ["r.html", "d.html"]) {
      const r = await cli("verify", join(d, f));
      expect(r.code, r.stdout).toBe(0);
      expect(r.stdout).toMatch(/REPRODUCED/);
    }
  });

  it("a folder given for a ride or respond record's input names the option that gave it", async () => {
    const d = tempDir();
    const rep = join(d, "r.html");
    const made = await cli(
      "respond",
      "samples/profiles/quarry-bend-bracket.yaml",
      "--fn",
      "20:1000",
      "--q",
      "10",
      "--report",
      rep,
    );
    expect(made.code, made.stderr).toBe(0);
    const r = await cli("verify", rep, "--profile", "samples/profiles");
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(
      "option --profile: expected a readable profile file, received a folder [FILE_UNREADABLE]",
    );
    const t = await cli("transfer", "samples/quarry-bend-bracket.csv", "--in", "base", "--report", join(d, "t.html"));
    expect(t.code, t.stderr).toBe(0);
    const v = await cli("verify", join(d, "t.html"), "--recording", "samples");
    expect(v.code).toBe(2);
    expect(v.stderr).toContain("option --recording: expected a readable recording, received a folder");
  });
  it("ride and transfer records carry the resolved analysis, and verify compares it: a changed line spacing in it is named", async () => {
    const d = tempDir();
    copyFileSync("samples/quarry-bend-bracket.csv", join(d, "bracket.csv"));
    expect(
      (
        await cli(
          "transfer",
          join(d, "bracket.csv"),
          "--in",
          "base",
          "--output-channel",
          "tip",
          "--from",
          "2",
          "--to",
          "9.5",
          "--report",
          join(d, "t.html"),
        )
      ).code,
    ).toBe(0);
    const ok = await cli("verify", join(d, "t.html"));
    expect(ok.code, ok.stdout).toBe(0);
    const f = join(d, "t.html");
    writeFileSync(
      f,
      forge(
        readFileSync(f, "utf8"),
        (p) => p,
        (doc) => {
          const a = (doc.result as { analysis: { welch: { resolutionHz: number }; channels: unknown[] } }).analysis;
          expect(a.channels.length).toBe(2);
          a.welch.resolutionHz *= 2;
        },
      ),
    );
    const bad = await cli("verify", f, "--json");
    expect(bad.code).toBe(1);
    expect(JSON.parse(bad.stdout).differences.join("\n")).toMatch(/analysis\.welch\.resolutionHz/);
  });
});
