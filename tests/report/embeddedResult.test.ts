import { describe, expect, it } from "vitest";
import { embedResult, extractResult, RESULT_PLACEHOLDER } from "../../src/report/embeddedResult.js";

const page = `<html><body><p>42 g</p>${RESULT_PLACEHOLDER}</body></html>`;

describe("embedResult / extractResult", () => {
  it("embedResult then extractResult gives the result back, both digests intact, even with < > & and </template> in its strings", () => {
    const html = embedResult(page, { kind: "check", note: "a </template> <b>&amp; inside" });
    expect(html).not.toContain("</template> <b>");
    const x = extractResult(html);
    expect(x).toMatchObject({ found: true, resultIntact: true, pageIntact: true });
    expect(x.doc!.note).toBe("a </template> <b>&amp; inside");
    expect(x.doc!.format).toBe("psdgate-report/1");
  });

  it("extractResult finds an edit to the page (pageIntact false) and to the result (resultIntact false)", () => {
    const html = embedResult(page, { value: 1.5 });
    expect(extractResult(html.replace("42 g", "41 g"))).toMatchObject({ resultIntact: true, pageIntact: false });
    expect(extractResult(html.replace('"value":1.5', '"value":1.6'))).toMatchObject({
      resultIntact: false,
      pageIntact: true,
    });
    expect(extractResult("<html></html>")).toMatchObject({ found: false });
  });
});
