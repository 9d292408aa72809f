import { describe, expect, it } from "vitest";
import { unindexedForeignKeys } from "./schema";

/**
 * Every foreign-key column leads some index. Without one, deleting or updating a parent row scans the whole child
 * table (the database checks each child for the ON DELETE action), and joins from parent to child do the same.
 */
describe("indexes", () => {
  it("has an index led by every foreign-key column", async () => {
    expect(await unindexedForeignKeys()).toEqual([]);
  });
});
