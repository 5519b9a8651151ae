/**
 * The one error every header parser throws. It names the file, where in it the problem sits
 * (a byte offset for binary headers, a JSON path for side files), the field, what is wrong and
 * what the user can do, so the browser can refuse a bad file before uploading it and the
 * server can show the same words.
 */
export class RecordingFormatError extends Error {
  override readonly name = 'RecordingFormatError';

  constructor(
    readonly fileName: string,
    /** Byte offset of the offending field, or null where a JSON path says more. */
    readonly byteOffset: number | null,
    /** The field or JSON path, e.g. "fmt.nChannels" or "global.core:datatype". */
    readonly field: string,
    /** What is wrong, as one sentence without a trailing full stop. */
    readonly problem: string,
    /** What to do about it, one or two sentences. */
    readonly remedy: string,
    /**
     * Set when the caller handed over only the start of a file and the header continues past
     * it: read at least this many bytes from the start and parse again.
     */
    readonly bytesNeeded?: number,
  ) {
    super(`${fileName} ${byteOffset === null ? `(${field})` : `@ byte ${byteOffset}`}: ${problem}. ${remedy}`);
  }

  toJSON(): RecordingFormatErrorJson {
    return {
      fileName: this.fileName,
      byteOffset: this.byteOffset,
      field: this.field,
      problem: this.problem,
      remedy: this.remedy,
      message: this.message,
      ...(this.bytesNeeded === undefined ? {} : { bytesNeeded: this.bytesNeeded }),
    };
  }
}

export interface RecordingFormatErrorJson {
  fileName: string;
  byteOffset: number | null;
  field: string;
  problem: string;
  remedy: string;
  message: string;
  bytesNeeded?: number;
}
