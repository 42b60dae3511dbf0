// Item 8: the shared input building blocks every text, number, date and id field uses.
import { describe, expect, it } from "vitest";
import {
  calendarDate,
  decimalNumber,
  emailSchema,
  multiLineText,
  positiveId,
  positiveIdFromText,
  singleLineText,
} from "./validation";

describe("singleLineText", () => {
  const name = singleLineText({ max: 12, required: "Enter a name." });
  it("trims and keeps plain text, letters of any script included", () => {
    expect(name.parse("  Ana Sousa ")).toBe("Ana Sousa");
    expect(name.parse("Łukasz Čech")).toBe("Łukasz Čech");
    expect(name.parse("عمر")).toBe("عمر");
  });
  it.each(["a\u0000b", "a\u0007b", "a\u001b[0m", "a\r\nb", "a\nb", "a\tb", "a\u007fb", "a\u0085b", "a\u2028b", "a\u202eb", "a\u2066b", "a\ud800b"])(
    "refuses %j",
    (s) => {
      expect(name.safeParse(s).success).toBe(false);
    },
  );
  it("says what is missing or too long", () => {
    expect(name.safeParse("  ").error?.issues[0]?.message).toBe("Enter a name.");
    expect(name.safeParse(undefined).error?.issues[0]?.message).toBe("Enter a name.");
    expect(name.safeParse("x".repeat(13)).error?.issues[0]?.message).toBe("At most 12 characters.");
    expect(singleLineText({ max: 5 }).parse("")).toBe("");
  });
});

describe("multiLineText", () => {
  const notes = multiLineText({ max: 20 });
  it("keeps LF and TAB, turns CR LF and lone CR into LF", () => {
    expect(notes.parse("a\r\nb\rc\td\n")).toBe("a\nb\nc\td");
  });
  it.each(["a\u0000b", "a\u0007b", "a\u001bb", "a\u000bb", "a\u000cb", "a\udc00b"])("refuses %j", (s) => {
    expect(notes.safeParse(s).success).toBe(false);
  });
});

describe("decimalNumber", () => {
  const n = decimalNumber("Enter a number.");
  it.each([
    ["12", 12],
    [" -0.5 ", -0.5],
    [".5", 0.5],
    ["1e3", 1000],
    ["+7", 7],
    [3.25, 3.25],
  ])("reads %j as %j", (v, expected) => {
    expect(n.parse(v)).toBe(expected);
  });
  it.each(["0x10", "0b1", "1_000", "12abc", "", " ", "Infinity", "NaN", "1e999", [5], true, false, null, undefined, {}, Number.NaN, Infinity])(
    "refuses %j with the message",
    (v) => {
      expect(n.safeParse(v).error?.issues[0]?.message).toBe("Enter a number.");
    },
  );
});

describe("calendarDate", () => {
  const d = calendarDate();
  it.each(["2000-01-01", "2024-02-29", "2099-12-31"])("accepts %s", (s) => {
    expect(d.parse(s)).toBe(s);
  });
  it.each([
    ["2026-02-30", "There is no such day."],
    ["2025-02-29", "There is no such day."],
    ["2025-13-01", "There is no such day."],
    ["2025-00-10", "There is no such day."],
    ["0000-01-01", "Pick a day from 2000-01-01 to 2099-12-31."],
    ["9999-12-31", "Pick a day from 2000-01-01 to 2099-12-31."],
    ["2026-2-3", "Use YYYY-MM-DD."],
    ["2026-02-03T00:00", "Use YYYY-MM-DD."],
    ["2026-02-03\u0000", "Use YYYY-MM-DD."],
  ])("refuses %s: %s", (s, message) => {
    expect(d.safeParse(s).error?.issues.map((i) => i.message)).toEqual([message]);
  });
});

describe("ids", () => {
  it("positiveId takes only whole JavaScript numbers from 1 to 2^31-1", () => {
    expect(positiveId(1)).toBe(1);
    expect(positiveId(2_147_483_647)).toBe(2_147_483_647);
    for (const v of [0, -1, 1.5, 2 ** 31, Number.NaN, Infinity, "7", [7], null, true, {}]) expect(positiveId(v)).toBeNull();
  });
  it("positiveIdFromText takes canonical digits only", () => {
    expect(positiveIdFromText("42")).toBe(42);
    for (const s of ["042", "+42", "42.0", " 42", "4e1", "0x2a", "", "2147483648", "99999999999"]) expect(positiveIdFromText(s)).toBeNull();
  });
});

describe("emailSchema", () => {
  it("bounds the length before anything else sees it", () => {
    expect(emailSchema.parse(" Pat@Shop.Example ")).toBe("pat@shop.example");
    expect(emailSchema.safeParse(`${"a".repeat(234)}@example.test`).success).toBe(false);
    expect(emailSchema.safeParse(`${"a".repeat(64)}@${"b".repeat(63)}.${"c".repeat(63)}.${"d".repeat(57)}.test`).success).toBe(false);
    expect(emailSchema.safeParse("a\u0000@example.test").success).toBe(false);
  });
});
