package dev.watcher.model;

/**
 * Where a follower stands in one log file: its identity ({@code fileKey}: device and inode as the OS gives
 * them, or null where the OS gives none), the byte offset just after the last complete line delivered, the
 * number of lines delivered so far, and a fingerprint (hex hash) of the file's first bytes, so that a file
 * truncated and regrown between two polls is still recognised as new.
 */
public record TailPosition(String fileKey, long offset, long lineNo, String fingerprint) {

    public static final TailPosition START = new TailPosition(null, 0, 0, null);
}
