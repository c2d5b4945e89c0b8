import type { Compiler, Configuration } from 'webpack';
export declare class BrowserBoundaryPlugin {
  apply(compiler: Compiler): void;
}
declare const makeConfig: (env?: Record<string, unknown>, argv?: { mode?: string }) => Configuration;
export default makeConfig;
