import { msg } from "../messages.js";
import { findField } from "./csv-records.js";
import { location, type RowAccount } from "./quality.js";

/**
 * Strict mode, two rows with the same key and different values: rejects (and so stops at) the
 * earlier row, at the first field where they differ, naming the other lines. Reads that one line
 * again from the file for its column, since the readers keep no positions of accepted rows.
 */
export function rejectConflict(
  account: RowAccount,
  where: {
    path: string;
    file: string;
    line: number;
    otherLines: readonly number[];
    column: string;
    index: number;
  },
): void {
  const place = findField(where.path, where.line, where.index);
  account.reject("conflict", {
    at: location(where.file, place?.line ?? where.line, place?.column),
    column: where.column,
    ...(place ? { value: place.text } : {}),
    detail: msg.conflictWith(where.line, [where.line, ...where.otherLines]),
  });
}
