/**
 * The CSV trace of `plenum run --csv FILE`, written to its temporary file as the samples are
 * taken (in the simulating thread), so that the history is never held as one text: a run of
 * many channels and samples needed some 50 bytes a value more for the text, and a text over
 * 512 MB cannot be made at all. The command renames the file into place with its other outputs.
 */
import { closeSync, fsyncSync, openSync } from 'node:fs';
import { csvHeader, csvRow } from '../report/csv.js';
import { writeAll } from './io.js';

/** Characters gathered before a write. */
const CHUNK = 1 << 20;

export class CsvFile {
  private readonly fd: number;
  private buf = '';
  /** The first write error (e.g. ENOSPC), after which nothing more is written. */
  error: string | undefined;

  /** Creates `path` (exclusively: never through a link planted at the name). */
  constructor(readonly path: string) {
    this.fd = openSync(path, 'wx');
  }

  begin(channels: readonly { key: string; unit: string }[]): void {
    this.buf = `${csvHeader(channels)}\n`;
  }

  sample(t: number, row: Float64Array): void {
    if (this.error) return;
    this.buf += `${csvRow(t, row)}\n`;
    if (this.buf.length >= CHUNK) this.flush();
  }

  private flush(): void {
    if (this.error || !this.buf) return;
    try {
      writeAll(this.fd, this.buf);
    } catch (e) {
      this.error = (e as NodeJS.ErrnoException).code ?? String(e);
    }
    this.buf = '';
  }

  /** Writes what is left and closes the file; returns the write error, if any. */
  close(): string | undefined {
    this.flush();
    try {
      if (!this.error) fsyncSync(this.fd);
    } catch (e) {
      this.error = (e as NodeJS.ErrnoException).code ?? String(e);
    }
    closeSync(this.fd);
    return this.error;
  }
}
