package dev.watcher.tail;

import dev.watcher.model.Malformed;
import java.util.Objects;

/**
 * A thing the tail stage saw besides lines: a change to the followed file, or one line of bad input that was
 * counted (and cut, replaced or skipped). Never an error: the reader goes on.
 *
 * @param kind   what happened
 * @param lineNo the 1-based line it concerns, or the number of lines read so far for file events
 * @param detail one readable sentence naming the file
 */
public record TailNotice(Kind kind, long lineNo, String detail) {

    public TailNotice {
        Objects.requireNonNull(kind, "kind");
        detail = detail == null ? "" : detail;
    }

    /** The bad-input kind this notice counts as, or null for a file event that is not bad input. */
    public Malformed malformed() {
        return kind.malformed();
    }

    /** What the tail stage saw. */
    public enum Kind {
        /** The file shrank below the read position or its first bytes changed: read again from the start. */
        TRUNCATED(null),
        /** Another file now stands at the path (new file identity): the old one was finished first. */
        REPLACED(null),
        /** The file disappeared; the follower waits for it to come back. */
        GONE(Malformed.FILE_GONE),
        /** The file exists (again, or for the first time after the follower started waiting). */
        APPEARED(null),
        /** A line longer than the cap: kept up to the cap, the rest dropped. */
        LINE_CUT(Malformed.TOO_LONG),
        /** A line with invalid or truncated UTF-8: the bad bytes became U+FFFD. */
        BAD_UTF8(Malformed.BAD_UTF8),
        /** A line with NUL or other control bytes that are not text: skipped. */
        BINARY(Malformed.BINARY);

        private final Malformed malformed;

        Kind(Malformed malformed) {
            this.malformed = malformed;
        }

        /** The bad-input counter this kind feeds, or null. */
        public Malformed malformed() {
            return malformed;
        }
    }
}
