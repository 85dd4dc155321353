/** Declarations for scripts/api-doc.mjs (imported by the package test). */
export declare function apiMarkdown(): string;
