// What went wrong with a delivery, in words a technician can act on: the error and its causes
// ("fetch failed: connect ECONNREFUSED 127.0.0.1:8080"), never the bare "fetch failed" of Node's
// fetch, and never a credential that a URL in the text might carry.

const URL_CREDENTIALS = /([a-z][a-z0-9+.-]*:\/\/)[^/\s@]+@/gi;

/** Replaces user:password@ in any URL inside `text` with ***@. */
export function redactUrlCredentials(text: string): string {
  return text.replace(URL_CREDENTIALS, '$1***@');
}

/** The error, its `cause` chain and the first of an AggregateError's errors, joined with ": " (duplicates dropped), credentials redacted. */
export function describeDeliveryError(error: unknown): string {
  const parts: string[] = [];
  let current: unknown = error;
  for (let depth = 0; depth < 6 && current !== undefined && current !== null; depth++) {
    if (current instanceof Error) {
      const code = (current as NodeJS.ErrnoException).code;
      let text = current.message;
      if (text === '' && current instanceof AggregateError) text = 'several attempts failed';
      if (code !== undefined && !text.includes(code)) text = `${text === '' ? '' : `${text} `}(${code})`;
      if (text !== '' && !parts.some((p) => p.includes(text))) parts.push(text);
      current = current.cause ?? (current instanceof AggregateError ? (current.errors as unknown[])[0] : undefined);
    } else {
      parts.push(String(current));
      break;
    }
  }
  return redactUrlCredentials(parts.length === 0 ? 'unknown error' : parts.join(': '));
}
