/**
 * What `res.json()` sends as T: Express writes a Date with its toJSON(), the ISO string the shared
 * answer types declare, so wherever T has a plain string a Date may stand. Lets a handler check its
 * answer against the type the web reads (`satisfies Json<AlarmView>`) without converting each timestamp.
 */
export type Json<T> = T extends unknown
  ? string extends T
    ? T | Date
    : T extends readonly (infer Item)[]
      ? Json<Item>[]
      : T extends object
        ? { [K in keyof T]: Json<T[K]> }
        : T
  : never;
