/**
 * The data-quality account: every row read is either accepted, rejected with a reason, or an
 * exact duplicate counted once. Nothing is dropped without being counted here.
 *
 * Strictness lives here too, so that no reader can forget it: with `strict` set (settings
 * `strict: true`), the first rejection throws a StrictRowError naming its location instead of being
 * counted.
 */
import { StrictRowError } from "../errors.js";
import { msg, REJECT_REASONS, type RejectReason } from "../messages.js";

export interface Example {
  /** file:line or file:line:column */
  readonly at: string;
  readonly column?: string;
  readonly value?: string;
  /** What exactly the reader found, and what to do, when it says more than the reason's text. */
  readonly detail?: string;
}

export interface ReasonCount {
  readonly reason: RejectReason;
  readonly text: string;
  readonly count: number;
  readonly examples: readonly Example[];
}

export interface AccountOptions {
  /** Examples kept per reason (settings `examples_per_reason`). */
  readonly examplesPerReason: number;
  /** Stop at the first rejected row (settings `strict`). */
  readonly strict: boolean;
}

/** A RowAccount as plain data, to pass between threads. */
export interface AccountSnapshot {
  readonly rowsRead: number;
  readonly blankLines: number;
  readonly duplicates: number;
  readonly duplicateExamples: readonly Example[];
  readonly reasons: readonly (readonly [RejectReason, { count: number; examples: Example[] }])[];
}

export class RowAccount {
  rowsRead = 0;
  blankLines = 0;
  duplicates = 0;
  readonly duplicateExamples: Example[] = [];
  private readonly reasons = new Map<RejectReason, { count: number; examples: Example[] }>();

  constructor(
    readonly file: string,
    private readonly options: AccountOptions,
  ) {}

  /** Counts a rejected row; in strict mode, stops the run there instead. */
  reject(reason: RejectReason, example: Example): void {
    if (this.options.strict) throw new StrictRowError(msg.strictStop(REJECT_REASONS[reason], example));
    let entry = this.reasons.get(reason);
    if (!entry) {
      entry = { count: 0, examples: [] };
      this.reasons.set(reason, entry);
    }
    entry.count++;
    if (entry.examples.length < this.options.examplesPerReason) entry.examples.push(example);
  }

  /** Counts n more rows rejected for `reason` whose examples were not kept (n ≥ 0). */
  addRejected(reason: RejectReason, n: number): void {
    if (n <= 0) return;
    const entry = this.reasons.get(reason);
    if (!entry) throw new Error(`addRejected: no example of ${reason} was counted first`);
    entry.count += n;
  }

  duplicate(example: Example): void {
    this.duplicates++;
    if (this.duplicateExamples.length < this.options.examplesPerReason) this.duplicateExamples.push(example);
  }

  snapshot(): AccountSnapshot {
    return {
      rowsRead: this.rowsRead,
      blankLines: this.blankLines,
      duplicates: this.duplicates,
      duplicateExamples: this.duplicateExamples,
      reasons: [...this.reasons.entries()],
    };
  }

  /** The account a snapshot was taken of, counting on from there. */
  static restore(file: string, options: AccountOptions, snapshot: AccountSnapshot): RowAccount {
    const account = new RowAccount(file, options);
    account.rowsRead = snapshot.rowsRead;
    account.blankLines = snapshot.blankLines;
    account.duplicates = snapshot.duplicates;
    account.duplicateExamples.push(...snapshot.duplicateExamples);
    for (const [reason, entry] of snapshot.reasons) {
      account.reasons.set(reason, { count: entry.count, examples: [...entry.examples] });
    }
    return account;
  }

  get rejected(): number {
    let n = 0;
    for (const entry of this.reasons.values()) n += entry.count;
    return n;
  }

  get accepted(): number {
    return this.rowsRead - this.rejected - this.duplicates;
  }

  byReason(): ReasonCount[] {
    return [...this.reasons.entries()]
      .map(([reason, e]) => ({ reason, text: REJECT_REASONS[reason], count: e.count, examples: e.examples }))
      .sort((a, b) => b.count - a.count || (a.reason < b.reason ? -1 : 1));
  }
}

export function location(file: string, line: number, column?: number): string {
  return column === undefined ? `${file}:${line}` : `${file}:${line}:${column}`;
}
