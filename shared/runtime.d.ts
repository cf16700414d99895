/**
 * The few globals that both of shared/'s runtimes (the browsers and Node 20) provide outside the
 * ECMAScript library: shared/ is checked without DOM or Node types (tsconfig.shared.json).
 */
declare function structuredClone<T>(value: T): T;
