/** Errors about the input that the user can act on; `code` is stable for the API and the CLI. */

export type VisionErrorCode = 'unreadable-image' | 'heic-unsupported' | 'too-many-pixels' | 'no-square' | 'too-few-holes';

export class VisionInputError extends Error {
  readonly code: VisionErrorCode;
  constructor(code: VisionErrorCode, message: string) {
    super(message);
    this.name = 'VisionInputError';
    this.code = code;
  }
}
