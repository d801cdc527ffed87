// Upload limits, in one place: the upload page and the cell/thermometer pages quote them, the server
// enforces them. Shared by browser and server code.

/** A bridge log uploaded as a past run: at most this many bytes … */
export const MAX_RUN_LOG_BYTES = 200 * 1024 * 1024;
/** … and this many data rows (a long freeze at one reading a second is ~10^5; this leaves room). */
export const MAX_RUN_LOG_ROWS = 2_000_000;
/** An attached document (assay, certificate): a PDF of at most this many bytes. */
export const MAX_DOCUMENT_BYTES = 10 * 1024 * 1024;
/**
 * Files travel in chunks of this size: the server refuses request bodies past 1 MiB (adapter-node's
 * BODY_SIZE_LIMIT, set in server.js for the instrument API), so a large file is sent piece by piece.
 */
export const UPLOAD_CHUNK_BYTES = 512 * 1024;
/** Bad rows listed in detail (all are counted). */
export const MAX_LISTED_PROBLEMS = 1000;
/** An upload not confirmed within this time is discarded with its staged rows. */
export const UPLOAD_EXPIRY_MS = 24 * 60 * 60 * 1000;

export function formatBytes(bytes: number): string {
	if (bytes >= 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(bytes >= 10 * 1024 * 1024 ? 0 : 1)} MiB`;
	if (bytes >= 1024) return `${(bytes / 1024).toFixed(0)} KiB`;
	return `${bytes} B`;
}
