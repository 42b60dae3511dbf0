import { describe, expect, it } from "vitest";
import { connectionRefusal, describeUploadRefusal } from "./upload-messages";

describe("describeUploadRefusal", () => {
  it("keeps the server's words and titles them by status", () => {
    const r = describeUploadRefusal(413, { error: "The file is larger than the limit of 52428800 bytes (50 MiB)." });
    expect(r.title).toBe("The file is too large");
    expect(r.detail).toContain("52428800");
    expect(describeUploadRefusal(415, { error: "The file contains NUL bytes." }).title).toBe("This is not a text program");
  });

  it("lists field problems of a 422", () => {
    const r = describeUploadRefusal(422, {
      error: "The SHA-256 you sent does not match the bytes received; nothing was stored.",
      issues: { fieldErrors: { sha256: ["received abc"] } },
    });
    expect(r.title).toBe("The file was refused");
    expect(r.issues).toEqual(["sha256: received abc"]);
  });

  it("copes with a body that is not our JSON", () => {
    const r = describeUploadRefusal(502, "<html>bad gateway</html>");
    expect(r.title).toBe("The server could not store the upload");
    expect(r.detail).toMatch(/Nothing was stored/);
    expect(r.issues).toEqual([]);
    expect(describeUploadRefusal(401, { error: "Sign in first." }).detail).toMatch(/Sign in again/);
  });

  it("says a dropped connection stored nothing", () => {
    expect(connectionRefusal().detail).toMatch(/nothing was stored/);
  });
});
