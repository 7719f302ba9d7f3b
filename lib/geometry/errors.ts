/** Input errors of the measurement core: each names the offending field (a dotted path) for one clear message. */
export class GeometryInputError extends Error {
  constructor(public readonly field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'GeometryInputError';
  }
}
