/**
 * The one error type of the snapshot-file readers.
 *
 * `status` follows docs/conventions.md §7:
 * - 413: the file is larger than the configured limit;
 * - 415: the format, or an encoding inside a known format (an NPY dtype, a WAV
 *   sample format, an HDF5 datatype), is one these readers do not take;
 * - 422: the file claims a supported format but its content is invalid
 *   (bad magic, truncated, a lying shape, a non-number, NaN, one channel …)
 *   or an option is out of range;
 * - 500: the file could not be read at all (an I/O failure on the server side);
 *   the web layer should log it and answer with a generic message.
 *
 * `code` is stable (tests and the web layer match on it); `message` is for people
 * and names what is wrong and where. Rows and columns in `location` are 1-based
 * and count physical file lines (docs/conventions.md §6).
 */
export type DatasetErrorStatus = 413 | 415 | 422 | 500;

export type DatasetErrorCode =
  // 413
  | 'file-too-large'
  | 'line-too-long'
  // 415
  | 'unsupported-format'
  | 'unsupported-dtype'
  | 'unsupported-sample-format'
  // 422, shared
  | 'empty-file'
  | 'no-snapshots'
  | 'too-few-elements'
  | 'truncated'
  | 'corrupt'
  | 'bad-option'
  // 422, CSV
  | 'not-a-number'
  | 'not-finite'
  | 'empty-field'
  | 'ragged-row'
  | 'binary-content'
  // 422, NPY
  | 'bad-magic'
  | 'bad-header'
  | 'bad-shape'
  | 'shape-mismatch'
  // 422, HDF5
  | 'dataset-not-found'
  | 'no-2d-dataset'
  | 'ambiguous-dataset'
  // 422, WAV
  | 'too-few-channels'
  | 'missing-frequency'
  | 'frequency-above-nyquist'
  | 'too-few-samples'
  // 500
  | 'io-error';

export interface DatasetErrorLocation {
  /** 1-based physical line of the file (CSV) or snapshot row (binary formats). */
  row?: number;
  /** 1-based column (element) index. */
  column?: number;
}

export class DatasetError extends Error {
  readonly status: DatasetErrorStatus;
  readonly code: DatasetErrorCode;
  readonly location?: DatasetErrorLocation;

  constructor(status: DatasetErrorStatus, code: DatasetErrorCode, message: string, location?: DatasetErrorLocation) {
    super(message);
    this.name = 'DatasetError';
    this.status = status;
    this.code = code;
    if (location) this.location = location;
  }

  /** A plain object for logs and API bodies: `{code, message, location?}`. */
  toJSON(): { code: DatasetErrorCode; message: string; status: DatasetErrorStatus; location?: DatasetErrorLocation } {
    return {
      status: this.status,
      code: this.code,
      message: this.message,
      ...(this.location ? { location: this.location } : {}),
    };
  }
}

export function invalid(code: DatasetErrorCode, message: string, location?: DatasetErrorLocation): DatasetError {
  return new DatasetError(422, code, message, location);
}

export function unsupported(code: DatasetErrorCode, message: string): DatasetError {
  return new DatasetError(415, code, message);
}

/**
 * Quotes a piece of user text for an error message: control characters and
 * non-ASCII are escaped, and long text is cut to `max` characters with an ellipsis.
 */
export function quoteText(text: string, max = 40): string {
  const cut = text.length > max ? text.slice(0, max) : text;
  let out = '';
  for (let i = 0; i < cut.length; i++) {
    const c = cut.charCodeAt(i);
    if (c === 0x27) out += "\\'";
    else if (c === 0x5c) out += '\\\\';
    else if (c >= 0x20 && c < 0x7f) out += cut[i];
    else if (c === 0x09) out += '\\t';
    else out += '\\u' + c.toString(16).padStart(4, '0');
  }
  return `'${out}${text.length > max ? '…' : ''}'`;
}
