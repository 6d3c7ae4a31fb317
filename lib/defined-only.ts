/**
 * Drop the keys whose value is `undefined`, so an options object can be spread over defaults
 * without an explicit `undefined` overriding them. Returns a new object; the input is unchanged.
 *
 * @example
 * ({ ...{ seed: 1 }, ...definedOnly({ seed: undefined }) }) // { seed: 1 }
 */
export function definedOnly<T extends object>(options: T): Partial<T> {
  return Object.fromEntries(Object.entries(options).filter(([, value]) => value !== undefined)) as Partial<T>;
}
