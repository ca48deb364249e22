// Accepted rows on their way to the store, held as typed-array columns rather than an object
// per row, and read back by index once committed.

export type LiveValue = number | boolean | string;

export interface RowIn {
  pointId: number;
  siteId: string;
  ts: number;
  /** Numbers and booleans (0/1) */
  value: number | null;
  /** State and text points */
  text: string | null;
  quality: 0 | 1 | 2;
  /** The value as screens get it (canonical units, booleans as booleans). */
  live: LiveValue;
}

/** The rows one flush committed, read by index so the listeners get no object per row. */
export interface CommittedRows {
  readonly length: number;
  pointId(i: number): number;
  siteId(i: number): string;
  ts(i: number): number;
  quality(i: number): 0 | 1 | 2;
  /** The value as screens get it (canonical units, booleans as booleans). */
  live(i: number): LiveValue;
}

const ROW_NUMBER = 0;
const ROW_BOOLEAN = 1;
const ROW_TEXT = 2;

/**
 * Queued rows as columns. Rows wait here from submit until their flush commits, which under
 * load spans a young-generation collection or two: columns are not copied and promoted by those
 * collections as an object per row would be. After the commit, listeners read the new rows
 * through a view of these columns (CommittedRows).
 */
export class RowColumns {
  length = 0;
  pointId: Int32Array;
  ts: Float64Array;
  value: Float64Array;
  quality: Uint8Array;
  kind: Uint8Array;
  siteId: string[] = [];
  texts: Array<[row: number, text: string]> = [];

  constructor(capacity: number) {
    this.pointId = new Int32Array(capacity);
    this.ts = new Float64Array(capacity);
    this.value = new Float64Array(capacity);
    this.quality = new Uint8Array(capacity);
    this.kind = new Uint8Array(capacity);
  }

  push(r: RowIn) {
    const i = this.length;
    if (i === this.pointId.length) this.grow();
    this.pointId[i] = r.pointId;
    this.ts[i] = r.ts;
    this.value[i] = r.value ?? NaN;
    this.quality[i] = r.quality;
    this.kind[i] = r.text !== null ? ROW_TEXT : typeof r.live === "boolean" ? ROW_BOOLEAN : ROW_NUMBER;
    this.siteId.push(r.siteId);
    if (r.text !== null) this.texts.push([i, r.text]);
    this.length = i + 1;
  }

  /** The rows listed in `rows` (indexes into these columns), as listeners of committed rows read them. */
  view(rows: Int32Array): CommittedRows {
    const texts = new Map(this.texts);
    return {
      length: rows.length,
      pointId: (i) => this.pointId[rows[i]],
      siteId: (i) => this.siteId[rows[i]],
      ts: (i) => this.ts[rows[i]],
      quality: (i) => this.quality[rows[i]] as 0 | 1 | 2,
      live: (i) => {
        const k = rows[i];
        const kind = this.kind[k];
        return kind === ROW_TEXT ? (texts.get(k) ?? "") : kind === ROW_BOOLEAN ? this.value[k] !== 0 : this.value[k];
      },
    };
  }

  private grow() {
    const n = this.pointId.length * 2;
    const into = <T extends Int32Array | Float64Array | Uint8Array>(bigger: T, from: T) => (bigger.set(from), bigger);
    this.pointId = into(new Int32Array(n), this.pointId);
    this.ts = into(new Float64Array(n), this.ts);
    this.value = into(new Float64Array(n), this.value);
    this.quality = into(new Uint8Array(n), this.quality);
    this.kind = into(new Uint8Array(n), this.kind);
  }
}
