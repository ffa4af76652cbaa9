package dev.watcher.parse;

import dev.watcher.model.LineParser;
import java.util.List;
import java.util.Map;

/**
 * A log format, built in ({@link Formats#builtIn}) or read from a format file ({@link Formats#load}).
 * Immutable and shareable between threads; each source of each run gets its own parser from
 * {@link #newParser()}.
 */
public interface FormatSpec {

    /** The format's name (a built-in's name, or the {@code name:} of its file). */
    String name();

    /** A fresh parser for one source; parsers keep state between lines and are not thread-safe. */
    LineParser newParser();

    /**
     * Equation families the format declares (family name to equation names, in declaration order), for the
     * family detectors; empty when the format declares none. Never null.
     */
    Map<String, List<String>> families();
}
