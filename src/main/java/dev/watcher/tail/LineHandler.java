package dev.watcher.tail;

/**
 * Receives the complete lines of a log, in file order, from a {@link FileFollower} or {@link LogReader}.
 *
 * <p>Called on the thread that polls or reads; never concurrently for one follower. The {@code line} is
 * only valid during the call: it may be a reusable view over the reader's byte buffer, so a receiver copies
 * ({@code toString()}) whatever it keeps. The line carries no terminator ({@code \n}, {@code \r\n} and a bare
 * {@code \r} all end a line).
 */
@FunctionalInterface
public interface LineHandler {

    /**
     * One complete line.
     *
     * @param line   the line's text without its terminator; valid only during this call
     * @param lineNo the line's 1-based number in the current file (skipped binary lines are counted too, so
     *               numbers match the file)
     */
    void line(CharSequence line, long lineNo);

    /** Something happened to the file or to one line (truncation, replacement, a cut line...). */
    default void notice(TailNotice notice) {
    }
}
