/** Readonly all the way down, so that readonly science results can be checked against mutable wire types. */
export type DeepReadonly<T> = T extends (infer U)[]
  ? readonly DeepReadonly<U>[]
  : T extends object
    ? { readonly [K in keyof T]: DeepReadonly<T[K]> }
    : T;

/** A result type with its members writable, for building it member by member instead of by spreads. */
export type Writable<T> = { -readonly [K in keyof T]: T[K] };
