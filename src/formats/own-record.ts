// Records keyed by strings from files: keys such as "__proto__" must become own data properties.

/** Sets record[key] = value as an own, enumerable data property (safe for any key, including "__proto__"). */
export function setOwn<T>(record: Record<string, T>, key: string, value: T): void {
  Object.defineProperty(record, key, { value, enumerable: true, writable: true, configurable: true });
}
