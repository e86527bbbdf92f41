// The mail templates: typed text (practical titles, names, course codes) never adds lines to a
// subject or a body, and data that do not fit a template are refused, not sent half-made.
import { describe, expect, test } from "vitest";
import { inline, renderMail } from "~/.server/mail/templates.server";

describe("mail templates", () => {
  test("a practical title with line breaks and direction marks stays on its line", () => {
    const title = "Ester hydrolysis\r\nBcc: someone@else.example\n\u202eevil\u200b";
    const r = renderMail("marks-released", { name: "Kim\nLee", practical: title, group: "Lab\tA", groupId: 4 });
    if (!r.ok) throw new Error(r.message);
    expect(r.subject).toBe("Marks released: Ester hydrolysis Bcc: someone@else.example evil");
    expect(r.subject).not.toMatch(/[\r\n]/);
    const lines = r.text.split("\n");
    expect(lines[0]).toBe("Hello Kim Lee,");
    expect(lines).toContain('The marks and feedback for "Ester hydrolysis Bcc: someone@else.example evil" (group Lab A) are ready.');
    expect(r.text).not.toMatch(/[\u202e\u200b\t\r]/);
  });

  test("every template's subject is one line", () => {
    const evil = "x\ny\rz";
    const cases: Array<[string, unknown]> = [
      ["invitation", { name: evil, inviter: evil, courseCode: evil, courseTitle: evil, role: "student", token: "t".repeat(43) }],
      ["password-reset", { name: evil, token: "t".repeat(43) }],
      ["bench-notice", { name: evil, group: evil, practical: evil, date: "2026-12-03", bench: evil, sessionId: 1, benchId: 2, deadlineUtc: null }],
      ["marks-released", { name: evil, practical: evil, group: evil, groupId: 3 }],
    ];
    for (const [template, data] of cases) {
      const r = renderMail(template, data);
      expect(r.ok, template).toBe(true);
      if (r.ok) {
        expect(r.subject).not.toMatch(/[\r\n]/);
        expect(r.text).toContain("x y z");
      }
    }
  });

  test("unknown templates and data that do not fit are refused with a reason", () => {
    expect(renderMail("no-such", {})).toMatchObject({ ok: false, message: expect.stringContaining('no mail template "no-such"') });
    expect(renderMail("password-reset", { name: "Kim" })).toMatchObject({ ok: false, message: expect.stringContaining("do not fit") });
  });

  test("inline() shortens very long text", () => {
    expect(inline("a".repeat(300), 10)).toBe("aaaaaaaaa…");
  });
});
