package dev.watcher.parse;

/**
 * What every parser does to a raw line before reading it: a trailing carriage return (a Windows line
 * ending) is dropped; a bare carriage return inside the line (a progress counter redrawn in place) splits
 * it into pieces, each read as a line of its own; trailing blanks go (leading ones stay: indentation may
 * mean something to a format); and an MPI rank prefix such as {@code [3] } is taken off,
 * remembering the rank, so output of several ranks interleaved in one file can be read (and, when the
 * format names one rank, filtered).
 */
final class LinePieces {

    /** Rank value when the line carries no rank prefix. */
    static final int NO_RANK = -1;

    private LinePieces() {
    }

    /** The receiver of one piece {@code [from, to)} of a line, with the rank its prefix gave, if any. */
    interface Piece {
        void accept(CharSequence line, int from, int to, int rank);
    }

    /** Splits {@code line} and passes each non-blank piece to {@code piece}, in order. */
    static void split(CharSequence line, Piece piece) {
        int n = line.length();
        int start = 0;
        for (int i = 0; i < n; i++) {
            if (line.charAt(i) == '\r') {
                emit(line, start, i, piece);
                start = i + 1;
            }
        }
        emit(line, start, n, piece);
    }

    private static void emit(CharSequence line, int from, int to, Piece piece) {
        while (to > from && isSpace(line.charAt(to - 1))) {
            to--;
        }
        int first = from;
        while (first < to && isSpace(line.charAt(first))) {
            first++;
        }
        if (first >= to) {
            return; // blank
        }
        int rank = NO_RANK;
        if (line.charAt(first) == '[') {
            int i = first + 1;
            int r = 0;
            while (i < to && i - first <= 7 && line.charAt(i) >= '0' && line.charAt(i) <= '9') {
                r = r * 10 + (line.charAt(i) - '0');
                i++;
            }
            if (i > first + 1 && i < to && line.charAt(i) == ']') {
                rank = r;
                from = i + 1;
                if (from < to && line.charAt(from) == ' ') {
                    from++; // the separator after the prefix; further indentation belongs to the line
                }
                if (from >= to) {
                    return;
                }
            }
        }
        piece.accept(line, from, to, rank);
    }

    static boolean isSpace(char c) {
        return c == ' ' || c == '\t' || c == '\f' || c == '\u000b';
    }

    /** At most {@code max} characters of {@code text} for a message, marked when cut. */
    static String clip(CharSequence text, int max) {
        String t = text.toString();
        return t.length() <= max ? t : t.substring(0, max) + "...";
    }
}
