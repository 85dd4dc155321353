/** Size limits of a netlist, in a module of their own so that the CLI can read a file before it loads the reader. */

/**
 * Largest netlist accepted: 8 MiB of UTF-8. A rig of a few dozen elements is a few kB; a
 * generated network of 10 000 chambers is 1.5 MB in flow style and over 2 MB in block style
 * with limits, which the limit must admit; beyond it the text is refused before it is read
 * into memory (a device, a runaway generator).
 */
export const MAX_SOURCE_BYTES = 8 * 1024 * 1024;

/** The limit for messages: "8388608 bytes (8 MiB)". */
export const MAX_SOURCE_TEXT = `${MAX_SOURCE_BYTES} bytes (${MAX_SOURCE_BYTES / 1024 / 1024} MiB)`;
