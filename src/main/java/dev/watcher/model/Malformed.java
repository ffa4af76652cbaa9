package dev.watcher.model;

import java.util.Locale;

/** Kinds of bad input. Each is counted per run and skipped; none is ever fatal. */
public enum Malformed {
    /** Bytes that are not text (NUL bytes, control garbage). */
    BINARY,
    /** A line longer than the cap: cut and counted. */
    TOO_LONG,
    /** Invalid or truncated UTF-8 (replaced by U+FFFD). */
    BAD_UTF8,
    /** A value that is not a number ({@code 1.2.3e-4}). */
    BAD_NUMBER,
    /** A required field (the iteration) is missing. */
    MISSING_FIELD,
    /** A line that does not have the declared shape (bad JSON, wrong column count). */
    BAD_SHAPE,
    /** The log file disappeared while being read. */
    FILE_GONE;

    /** Lowercase with dashes, as counters and the timeline name it. */
    public String id() {
        return name().toLowerCase(Locale.ROOT).replace('_', '-');
    }
}
