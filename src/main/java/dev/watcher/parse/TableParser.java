package dev.watcher.parse;

import dev.watcher.model.AsciiText;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Reads a delimited table with a header line. This is the replay hot path: fields are found by index over
 * the given {@link CharSequence} (no String per field, no regex), numbers go through {@link Numbers}, and
 * the names lists are made once per header and shared by every record under it.
 *
 * <p>Which line is the header: once a header is known (or the format names the iteration column), a line
 * (commented or not) whose fields are all words and whose first field is the iteration column's name.
 * Before any header, without a named iteration column, the latest line of words (commented or not, at least
 * two fields, no control characters) that has as many fields as the first data row. A header after the first one (a reprint, or a
 * restart that added a column) replaces it and, unless the format says otherwise, starts a new segment.
 * Other lines that start with a word or the comment prefix (banners, warnings) are skipped. A data row with
 * the wrong number of fields is {@code bad-shape}; a field that is not a number is {@code bad-number}.
 */
final class TableParser implements LineParser {

    private final TableSettings settings;
    private final Segments segments = new Segments();
    private final char delimiter;
    private final String comment;

    private final int[] end = new int[1];
    private final Row row = new Row();
    private int[] starts = new int[32];
    private int[] ends = new int[32];
    private int count;

    private Header header;
    /** Header candidates before the first data row, latest last (see the class comment); bounded. */
    private final java.util.ArrayDeque<String[]> pending = new java.util.ArrayDeque<>();
    private static final int MAX_CANDIDATES = 16;
    private static final int MAX_NAME = 256;

    TableParser(TableSettings settings) {
        this.settings = settings;
        this.delimiter = settings.delimiter();
        this.comment = settings.comment();
        if (!settings.columns().isEmpty()) {
            header = new Header(settings.columns().toArray(new String[0]), settings);
        }
    }

    @Override
    public void accept(CharSequence line, long lineNo, ParseSink sink) {
        int n = line.length();
        if (delimiter == 0 && header != null && header.fast) {
            if (line instanceof AsciiText a ? fastRowAscii(a, n, lineNo, sink) : fastRow(line, n, lineNo, sink)) {
                return;
            }
        }
        int pos = 0;
        while (true) {
            // A bare carriage return inside a line (a progress counter redrawn in place) ends a piece; each
            // piece is read as a line of its own. A trailing one (Windows line ending) leaves an empty piece.
            int stop = delimiter == 0 ? splitBlanks(line, pos, n) : splitDelimited(line, pos, n);
            if (count > 0) {
                piece(line, lineNo, sink);
            }
            if (stop >= n) {
                return;
            }
            pos = stop + 1;
        }
    }

    /**
     * The hot path for an ordinary data row of a blank-separated table: splits and parses in one pass,
     * straight from the line. Anything unusual (not a digit first, a rank prefix, a carriage return before
     * the end, a field count or value that is wrong) returns false before emitting anything, and the general
     * path reads the line again and reports it.
     */
    private boolean fastRow(CharSequence s, int n, long lineNo, ParseSink sink) {
        Header h = header;
        int i = 0;
        char c = 0;
        while (i < n && ((c = s.charAt(i)) == ' ' || c == '\t')) {
            i++;
        }
        if (i == n || c < '0' || c > '9') {
            return false;
        }
        int[] kinds = h.kinds;
        int[] slots = h.slotOf;
        int columns = kinds.length;
        Row row = this.row;
        row.start(h);
        int k = 0;
        int[] end = this.end;
        while (true) {
            while (i < n && ((c = s.charAt(i)) == ' ' || c == '\t')) {
                i++;
            }
            if (i == n) {
                break;
            }
            if (c == '\r') {
                int j = i + 1;
                while (j < n && ((c = s.charAt(j)) == ' ' || c == '\t' || c == '\r')) {
                    j++;
                }
                if (j < n) {
                    return false; // a progress line redrawn in place: the general path splits it
                }
                break;
            }
            if (k == columns) {
                return false;
            }
            double v = Numbers.scan(s, i, n, end);
            if (Numbers.isMalformed(v)) {
                return false;
            }
            if (!row.put(kinds[k], slots[k], v)) {
                return false;
            }
            i = end[0];
            k++;
        }
        if (k != columns) {
            return false;
        }
        row.emit(h, segments.before(row.iter, lineNo, sink), lineNo, sink);
        return true;
    }

    /** {@link #fastRow} over the bytes of an ASCII line: the same results. */
    private boolean fastRowAscii(AsciiText s, int n, long lineNo, ParseSink sink) {
        byte[] b = s.array();
        int o = s.offset();
        Header h = header;
        int i = 0;
        char c = 0;
        while (i < n && ((c = (char) b[o + i]) == ' ' || c == '\t')) {
            i++;
        }
        if (i == n || c < '0' || c > '9') {
            return false;
        }
        int[] kinds = h.kinds;
        int[] slots = h.slotOf;
        int columns = kinds.length;
        Row row = this.row;
        row.start(h);
        int k = 0;
        int[] end = this.end;
        while (true) {
            while (i < n && ((c = (char) b[o + i]) == ' ' || c == '\t')) {
                i++;
            }
            if (i == n) {
                break;
            }
            if (c == '\r') {
                int j = i + 1;
                while (j < n && ((c = (char) b[o + j]) == ' ' || c == '\t' || c == '\r')) {
                    j++;
                }
                if (j < n) {
                    return false; // a progress line redrawn in place: the general path splits it
                }
                break;
            }
            if (k == columns) {
                return false;
            }
            double v = Numbers.scanAscii(s, i, n, end);
            if (Numbers.isMalformed(v)) {
                return false;
            }
            if (!row.put(kinds[k], slots[k], v)) {
                return false;
            }
            i = end[0];
            k++;
        }
        if (k != columns) {
            return false;
        }
        row.emit(h, segments.before(row.iter, lineNo, sink), lineNo, sink);
        return true;
    }

    /**
     * The values of the data row being read by a fast path, one column at a time; reused from row to row
     * (the arrays are new for each row: they become the record's).
     */
    private static final class Row {
        double[] res;
        double[] mon;
        long iter;
        long step;
        long inner;
        double time;

        void start(Header h) {
            res = new double[h.resNames.size()];
            mon = new double[h.monNames.size()];
            iter = -1;
            step = IterationRecord.NONE;
            inner = IterationRecord.NONE;
            time = Double.NaN;
        }

        /** Stores one column's value by its kind; false when a counter column does not hold a count. */
        boolean put(int kind, int slot, double v) {
            switch (kind) {
                case Header.RESIDUAL:
                    res[slot] = v;
                    return true;
                case Header.MONITOR:
                    mon[slot] = v;
                    return true;
                case Header.ITERATION:
                    iter = counter(v);
                    return iter >= 0;
                case Header.STEP:
                    step = counter(v);
                    return step >= 0;
                case Header.INNER:
                    inner = counter(v);
                    return inner >= 0;
                case Header.TIME:
                    time = v;
                    return true;
                default:
                    return true;
            }
        }

        void emit(Header h, int segment, long lineNo, ParseSink sink) {
            sink.record(new IterationRecord(iter, step, time, inner,
                    res.length == 0 ? Samples.EMPTY : new Samples(h.resNames, res),
                    mon.length == 0 ? Samples.EMPTY : new Samples(h.monNames, mon), segment, lineNo));
        }
    }

    private static long counter(double v) {
        return v >= 0 && v < 9.0e15 && v == Math.rint(v) ? (long) v : -1;
    }

    private int splitBlanks(CharSequence s, int from, int to) {
        count = 0;
        int i = from;
        while (i < to) {
            char c = s.charAt(i);
            if (c == ' ' || c == '\t') {
                i++;
                continue;
            }
            if (c == '\r') {
                return i;
            }
            int start = i;
            while (i < to && (c = s.charAt(i)) != ' ' && c != '\t' && c != '\r') {
                i++;
            }
            add(start, i);
        }
        return to;
    }

    private int splitDelimited(CharSequence s, int from, int to) {
        count = 0;
        int end = from;
        while (end < to && s.charAt(end) != '\r') {
            end++;
        }
        int i = from;
        while (i < end && LinePieces.isSpace(s.charAt(i))) {
            i++;
        }
        if (i == end) {
            return end; // blank piece
        }
        int start = i;
        for (; i <= end; i++) {
            if (i == end || s.charAt(i) == delimiter) {
                int a = start;
                int b = i;
                while (a < b && LinePieces.isSpace(s.charAt(a))) {
                    a++;
                }
                while (b > a && LinePieces.isSpace(s.charAt(b - 1))) {
                    b--;
                }
                add(a, b);
                start = i + 1;
            }
        }
        return end;
    }

    private void add(int start, int end) {
        if (count == starts.length) {
            starts = Arrays.copyOf(starts, count * 2);
            ends = Arrays.copyOf(ends, count * 2);
        }
        starts[count] = start;
        ends[count] = end;
        count++;
    }

    private void removeFirst() {
        System.arraycopy(starts, 1, starts, 0, count - 1);
        System.arraycopy(ends, 1, ends, 0, count - 1);
        count--;
    }

    private void piece(CharSequence s, long lineNo, ParseSink sink) {
        // An MPI rank prefix "[3]" on the first field.
        int first = starts[0];
        if (s.charAt(first) == '[') {
            int i = first + 1;
            int r = 0;
            while (i < ends[0] && s.charAt(i) >= '0' && s.charAt(i) <= '9' && i - first < 8) {
                r = r * 10 + (s.charAt(i) - '0');
                i++;
            }
            if (i > first + 1 && i < ends[0] && s.charAt(i) == ']') {
                if (!settings.common().readsRank(r)) {
                    return;
                }
                i++;
                while (i < ends[0] && LinePieces.isSpace(s.charAt(i))) {
                    i++;
                }
                if (i == ends[0]) {
                    removeFirst();
                    if (count == 0) {
                        return;
                    }
                } else {
                    starts[0] = i;
                }
            }
        }
        if (!comment.isEmpty() && startsWith(s, starts[0], ends[0], comment)) {
            starts[0] += comment.length();
            if (starts[0] == ends[0] || (delimiter != 0 && isBlankField(s, 0))) {
                removeFirst();
            }
            trimFirst(s);
            if (count > 0) {
                maybeHeader(s, lineNo, sink);
            }
            return;
        }
        char c = s.charAt(starts[0]);
        boolean numeric = (c >= '0' && c <= '9') || c == '-' || c == '+' || c == '.';
        if (!numeric) {
            maybeHeader(s, lineNo, sink);
            return;
        }
        row(s, lineNo, sink);
    }

    private void trimFirst(CharSequence s) {
        if (count > 0) {
            while (starts[0] < ends[0] && LinePieces.isSpace(s.charAt(starts[0]))) {
                starts[0]++;
            }
        }
    }

    private boolean isBlankField(CharSequence s, int k) {
        for (int i = starts[k]; i < ends[k]; i++) {
            if (!LinePieces.isSpace(s.charAt(i))) {
                return false;
            }
        }
        return true;
    }

    private static boolean startsWith(CharSequence s, int from, int to, String prefix) {
        if (to - from < prefix.length()) {
            return false;
        }
        for (int k = 0; k < prefix.length(); k++) {
            if (s.charAt(from + k) != prefix.charAt(k)) {
                return false;
            }
        }
        return true;
    }

    private boolean fieldEquals(CharSequence s, int k, String name) {
        return ends[k] - starts[k] == name.length() && startsWith(s, starts[k], ends[k], name);
    }

    /** A line of words: the header, a header candidate, or a banner to skip. */
    private void maybeHeader(CharSequence s, long lineNo, ParseSink sink) {
        if (count < 2) {
            return;
        }
        for (int k = 0; k < count; k++) {
            if (ends[k] == starts[k] || !Numbers.isMalformed(Numbers.parse(s, starts[k], ends[k]))) {
                return; // a number among the words: a banner such as "restart from pass 800"
            }
            if (ends[k] - starts[k] > MAX_NAME) {
                return; // no column name is that long
            }
            for (int i = starts[k]; i < ends[k]; i++) {
                char c = s.charAt(i);
                if (c < ' ' || c == 0x7f || c == '\uFFFD') {
                    return; // control characters or undecodable bytes: not a column name
                }
            }
        }
        String iterName = settings.iteration() != null ? settings.iteration()
                : header != null ? header.names[0] : null;
        if (iterName != null && !fieldEquals(s, 0, iterName)) {
            return;
        }
        String[] names = new String[count];
        for (int k = 0; k < count; k++) {
            names[k] = unquote(s.subSequence(starts[k], ends[k]).toString());
        }
        if (iterName == null) {
            if (pending.size() == MAX_CANDIDATES) {
                pending.removeFirst();
            }
            pending.addLast(names); // the first data row picks the latest one of its width
            return;
        }
        install(names, lineNo, sink);
    }

    private static String unquote(String name) {
        if (name.length() >= 2 && name.charAt(0) == '"' && name.charAt(name.length() - 1) == '"') {
            return name.substring(1, name.length() - 1);
        }
        return name;
    }

    private void install(String[] names, long lineNo, ParseSink sink) {
        Header previous = header;
        if (previous != null && Arrays.equals(previous.names, names) && !settings.reprintedHeaderStartsSegment()) {
            return;
        }
        header = new Header(names, settings);
        if (header.iterCol < 0) {
            sink.malformed(Malformed.MISSING_FIELD, lineNo, "header has no iteration column \""
                    + settings.iteration() + "\"");
            header = previous;
            return;
        }
        if (previous != null && settings.reprintedHeaderStartsSegment()) {
            segments.declare(lineNo, Arrays.equals(previous.names, names) ? "header line repeated"
                    : "header changed to: " + String.join(" ", names), sink);
        }
    }

    private void row(CharSequence s, long lineNo, ParseSink sink) {
        Header h = header;
        if (h == null) {
            for (java.util.Iterator<String[]> it = pending.descendingIterator(); it.hasNext();) {
                String[] candidate = it.next();
                if (candidate.length == count) {
                    install(candidate, lineNo, sink);
                    pending.clear();
                    h = header;
                    break;
                }
            }
            if (h == null) {
                sink.malformed(Malformed.BAD_SHAPE, lineNo, "a data row before any header line with " + count
                        + " columns");
                return;
            }
        }
        if (count != h.names.length) {
            sink.malformed(Malformed.BAD_SHAPE, lineNo, "expected " + h.names.length + " columns, found " + count);
            return;
        }
        long iter = Numbers.parseCounter(s, starts[h.iterCol], ends[h.iterCol]);
        if (iter < 0) {
            bad(s, lineNo, sink, h, h.iterCol, "an iteration number");
            return;
        }
        long step = IterationRecord.NONE;
        long inner = IterationRecord.NONE;
        double time = Double.NaN;
        if (h.stepCol >= 0) {
            step = Numbers.parseCounter(s, starts[h.stepCol], ends[h.stepCol]);
            if (step < 0) {
                bad(s, lineNo, sink, h, h.stepCol, "a time-step number");
                return;
            }
        }
        if (h.innerCol >= 0) {
            inner = Numbers.parseCounter(s, starts[h.innerCol], ends[h.innerCol]);
            if (inner < 0) {
                bad(s, lineNo, sink, h, h.innerCol, "an inner-iteration number");
                return;
            }
        }
        if (h.timeCol >= 0) {
            time = Numbers.parse(s, starts[h.timeCol], ends[h.timeCol]);
            if (Numbers.isMalformed(time)) {
                bad(s, lineNo, sink, h, h.timeCol, "a number");
                return;
            }
        }
        double[] res = values(s, lineNo, sink, h, h.resCols, h.resSlots, h.resNames.size());
        if (res == null) {
            return;
        }
        double[] mon = values(s, lineNo, sink, h, h.monCols, h.monSlots, h.monNames.size());
        if (mon == null) {
            return;
        }
        int segment = segments.before(iter, lineNo, sink);
        sink.record(new IterationRecord(iter, step, time, inner,
                res.length == 0 ? Samples.EMPTY : new Samples(h.resNames, res),
                mon.length == 0 ? Samples.EMPTY : new Samples(h.monNames, mon), segment, lineNo));
    }

    private double[] values(CharSequence s, long lineNo, ParseSink sink, Header h, int[] cols, int[] slots,
            int size) {
        double[] out = new double[size];
        boolean[] seen = slots == null ? null : new boolean[size];
        for (int j = 0; j < cols.length; j++) {
            int k = cols[j];
            double v = Numbers.parse(s, starts[k], ends[k]);
            if (Numbers.isMalformed(v)) {
                bad(s, lineNo, sink, h, k, "a number");
                return null;
            }
            if (slots == null) {
                out[j] = v;
            } else {
                int slot = slots[j];
                out[slot] = seen[slot] ? settings.common().repeated().combine(out[slot], v) : v;
                seen[slot] = true;
            }
        }
        return out;
    }

    private void bad(CharSequence s, long lineNo, ParseSink sink, Header h, int k, String expected) {
        sink.malformed(Malformed.BAD_NUMBER, lineNo, "column \"" + h.names[k] + "\": \""
                + LinePieces.clip(s.subSequence(starts[k], ends[k]), 60) + "\" is not " + expected);
    }

    /** One header's column roles, computed once and shared by every row under it. */
    private static final class Header {
        static final int IGNORE = 0;
        static final int ITERATION = 1;
        static final int STEP = 2;
        static final int TIME = 3;
        static final int INNER = 4;
        static final int RESIDUAL = 5;
        static final int MONITOR = 6;

        final String[] names;
        final int[] kinds;  // per column, for the hot path
        final int[] slotOf; // per column: index in its residuals or monitors array
        final boolean fast; // no repeated names: the hot path applies
        final int iterCol;
        final int stepCol;
        final int timeCol;
        final int innerCol;
        final int[] resCols;
        final int[] resSlots; // null when no name repeats
        final List<String> resNames;
        final int[] monCols;
        final int[] monSlots;
        final List<String> monNames;

        Header(String[] names, TableSettings t) {
            this.names = names;
            iterCol = t.iteration() == null ? 0 : indexOf(names, t.iteration());
            stepCol = indexOf(names, t.step());
            timeCol = indexOf(names, t.time());
            innerCol = indexOf(names, t.inner());
            List<Integer> res = new ArrayList<>();
            List<Integer> mon = new ArrayList<>();
            for (int k = 0; k < names.length; k++) {
                if (k == iterCol || k == stepCol || k == timeCol || k == innerCol) {
                    continue;
                }
                switch (t.roleOf(names[k])) {
                    case RESIDUAL:
                        res.add(k);
                        break;
                    case MONITOR:
                        mon.add(k);
                        break;
                    default:
                        break;
                }
            }
            resCols = res.stream().mapToInt(Integer::intValue).toArray();
            monCols = mon.stream().mapToInt(Integer::intValue).toArray();
            List<String> rn = new ArrayList<>();
            resSlots = slots(names, resCols, rn);
            resNames = List.copyOf(rn);
            List<String> mn = new ArrayList<>();
            monSlots = slots(names, monCols, mn);
            monNames = List.copyOf(mn);
            kinds = new int[names.length];
            slotOf = new int[names.length];
            for (int j = 0; j < resCols.length; j++) {
                kinds[resCols[j]] = RESIDUAL;
                slotOf[resCols[j]] = j;
            }
            for (int j = 0; j < monCols.length; j++) {
                kinds[monCols[j]] = MONITOR;
                slotOf[monCols[j]] = j;
            }
            if (stepCol >= 0) {
                kinds[stepCol] = STEP;
            }
            if (timeCol >= 0) {
                kinds[timeCol] = TIME;
            }
            if (innerCol >= 0) {
                kinds[innerCol] = INNER;
            }
            if (iterCol >= 0) {
                kinds[iterCol] = ITERATION;
            }
            fast = resSlots == null && monSlots == null;
        }

        private static int[] slots(String[] names, int[] cols, List<String> unique) {
            int[] slots = new int[cols.length];
            boolean repeats = false;
            for (int j = 0; j < cols.length; j++) {
                String n = names[cols[j]];
                int at = unique.indexOf(n);
                if (at < 0) {
                    at = unique.size();
                    unique.add(n);
                } else {
                    repeats = true;
                }
                slots[j] = at;
            }
            return repeats ? slots : null;
        }

        private static int indexOf(String[] names, String name) {
            if (name == null) {
                return -1;
            }
            for (int k = 0; k < names.length; k++) {
                if (names[k].equals(name)) {
                    return k;
                }
            }
            return -1;
        }
    }
}
