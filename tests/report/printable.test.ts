import { describe, expect, it } from "vitest";
import { printable } from "../../src/report/printable.js";

describe("printable", () => {
  it("printable(): newlines, ESC sequences, C1 controls and bidi overrides become visible escapes", () => {
    expect(printable("KB\nVERDICT  PASS")).toBe("KB\\nVERDICT  PASS");
    expect(printable("\u001b[8mhidden\u001b[0m")).toBe("\\x1b[8mhidden\\x1b[0m");
    expect(printable("a\u009bb\u007fc\rd\te")).toBe("a\\x9bb\\x7fc\\rd\\te");
    expect(printable("x\u202eevil\u2066")).toBe("x\\u{202e}evil\\u{2066}");
  });
  it("printable(): ordinary text, including g²/Hz, µ and accents, is left alone", () => {
    const s = "Harrow Fen — Prüfstand 3, 0.04 g²/Hz, 5 µs";
    expect(printable(s)).toBe(s);
  });
});
