/** Size limits of a netlist, in a module of their own so that the CLI can read a file before it loads the reader. */

/** Largest netlist accepted: 2 MiB of UTF-8 (a large network is a few tens of kB). */
export const MAX_SOURCE_BYTES = 2 * 1024 * 1024;
