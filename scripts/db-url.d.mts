export declare const DEFAULT_PG_PORT: number;
export declare function pgPort(): number;
export declare function databaseName(): string;
export declare function pgPasswordFile(): string;
export declare function pgPassword(): string | null;
export declare function databaseUrl(): string;
