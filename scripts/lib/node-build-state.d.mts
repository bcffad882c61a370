// Types of node-build-state.mjs (plain JavaScript, so the CLI launcher can use it before anything is compiled).
export declare const NODE_SOURCES: string[];
export declare const NODE_BUILD_DIR: string;
export declare const NODE_BUILD_STAMP: string;
export declare function filesUnder(dir: string, keep: (name: string) => boolean): string[];
export declare function nodeBuildIsCurrent(root: string): boolean;
