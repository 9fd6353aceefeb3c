/** Pure folders ("app/units/", trailing slash) and single pure files ("app/errors.ts"), relative to the repository root. */
export declare const PURE_PATHS: readonly string[];
/** Absolute path of tsconfig.pure.json, whose `include` holds that list. */
export declare const PURE_TSCONFIG_PATH: string;
