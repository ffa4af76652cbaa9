package dev.watcher.model;

/**
 * Where a parser puts what it made of the lines. Called on the run's thread, in line order.
 */
public interface ParseSink {

    /** A complete iteration record. */
    void record(IterationRecord record);

    /**
     * A new segment starts (a solver restart: iteration counter going back, a declared restart or banner
     * line, a reprinted header). Called before the first record of the new segment.
     */
    void segment(int segment, long line, String reason);

    /** A line (or part of one) that could not be used: counted and skipped. */
    void malformed(Malformed kind, long line, String detail);
}
