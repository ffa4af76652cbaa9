package dev.watcher.model;

/**
 * Turns the lines of one source into records. One instance per source and run; not thread-safe; called on
 * the run's thread. It does no I/O and reads no clock. It never throws on bad input: bad lines go to
 * {@link ParseSink#malformed}.
 */
public interface LineParser {

    /** One complete line, without its terminator. {@code lineNo} is 1-based within the source. */
    void accept(CharSequence line, long lineNo, ParseSink sink);

    /** End of input for now (replay end, or shutdown): emit a record still being assembled, if complete. */
    default void flush(ParseSink sink) {
    }
}
