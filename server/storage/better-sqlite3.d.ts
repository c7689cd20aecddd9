// The part of better-sqlite3 12's API the server uses (the package ships no types and
// @types/better-sqlite3 is not a dependency). See https://github.com/WiseLibs/better-sqlite3/blob/master/docs/api.md
declare module 'better-sqlite3' {
  export interface RunResult {
    changes: number;
    lastInsertRowid: number | bigint;
  }
  export interface Statement<P extends unknown[] = unknown[]> {
    run(...params: P): RunResult;
    get(...params: P): unknown;
    all(...params: P): unknown[];
  }
  export interface Database {
    readonly open: boolean;
    readonly name: string;
    prepare<P extends unknown[] = unknown[]>(sql: string): Statement<P>;
    exec(sql: string): this;
    pragma(source: string, options?: { simple?: boolean }): unknown;
    transaction<A extends unknown[], R>(fn: (...args: A) => R): (...args: A) => R;
    backup(destination: string): Promise<unknown>;
    close(): this;
  }
  interface Options {
    readonly?: boolean;
    fileMustExist?: boolean;
    timeout?: number;
  }
  const DatabaseConstructor: { new (filename: string, options?: Options): Database };
  export default DatabaseConstructor;
}
