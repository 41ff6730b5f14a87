/**
 * Scenario JSON as a test reads and bends it: fields dropped, wrong types, values out of range,
 * or read without the schema's optional markers (the independent cross-checks). Deliberately
 * untyped, so a test can build the input a bad file would be.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- untyped on purpose: these inputs break the types
export type RawJson = any;
