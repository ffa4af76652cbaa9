package dev.watcher.bench;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import dev.watcher.model.AsciiText;
import dev.watcher.tail.LineHandler;
import dev.watcher.tail.LogReader;
import dev.watcher.tail.TailNotice;
import dev.watcher.tail.TailOptions;
import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;

/**
 * The front of replay, timed: {@link LogReader} over a whitespace table plus a parse of the iteration and the
 * eight numeric columns of each line (fast float parsing straight from the line view, no String per field),
 * summing {@code log(value)} as the reference awk line does. Prints records/s, MB/s and the peak heap.
 *
 * <p>Usage: {@code ReadBench FILE [REPEATS] [--split-only]}; with repeats, the last run is reported (the first
 * ones warm the JIT); {@code --split-only} times the line splitting alone, without parsing. The numbers are a
 * measurement, never a test.
 */
public final class ReadBench {

    private ReadBench() {
    }

    /** Parses each data line of the table; counts what does not parse. */
    static final class TableSink implements LineHandler {
        long records;
        long comments;
        long malformed;
        long notices;
        long lastIter;
        double sumLog;

        @Override
        public void line(CharSequence s, long lineNo) {
            if (s instanceof AsciiText a) {
                lineBytes(a.array(), a.offset(), a.offset() + a.length());
                return;
            }
            int n = s.length();
            int i = skipBlanks(s, 0, n);
            if (i == n || s.charAt(i) == '#') {
                comments++;
                return;
            }
            long iter = 0;
            int start = i;
            while (i < n) {
                char c = s.charAt(i);
                if (c < '0' || c > '9') {
                    break;
                }
                iter = iter * 10 + (c - '0');
                i++;
            }
            if (i == start) {
                malformed++;
                return;
            }
            double sum = 0;
            for (int col = 0; col < 8; col++) {
                i = skipBlanks(s, i, n);
                int from = i;
                while (i < n && s.charAt(i) > ' ') {
                    i++;
                }
                if (i == from) {
                    malformed++;
                    return;
                }
                try {
                    sum += Math.log(JavaDoubleParser.parseDouble(s, from, i - from));
                } catch (NumberFormatException e) {
                    malformed++;
                    return;
                }
            }
            sumLog += sum;
            lastIter = iter;
            records++;
        }

        @Override
        public void notice(TailNotice n) {
            notices++;
        }

        /** The same parse, straight from the bytes of an ASCII line. */
        private void lineBytes(byte[] b, int from, int to) {
            int i = skipBlanks(b, from, to);
            if (i == to || b[i] == '#') {
                comments++;
                return;
            }
            long iter = 0;
            int start = i;
            while (i < to) {
                int d = b[i] - '0';
                if (d < 0 || d > 9) {
                    break;
                }
                iter = iter * 10 + d;
                i++;
            }
            if (i == start) {
                malformed++;
                return;
            }
            double sum = 0;
            for (int col = 0; col < 8; col++) {
                i = skipBlanks(b, i, to);
                int f = i;
                while (i < to && b[i] > ' ') {
                    i++;
                }
                if (i == f) {
                    malformed++;
                    return;
                }
                try {
                    sum += Math.log(JavaDoubleParser.parseDouble(b, f, i - f));
                } catch (NumberFormatException e) {
                    malformed++;
                    return;
                }
            }
            sumLog += sum;
            lastIter = iter;
            records++;
        }

        private static int skipBlanks(byte[] b, int i, int n) {
            while (i < n && (b[i] == ' ' || b[i] == '\t')) {
                i++;
            }
            return i;
        }

        private static int skipBlanks(CharSequence s, int i, int n) {
            while (i < n && (s.charAt(i) == ' ' || s.charAt(i) == '\t')) {
                i++;
            }
            return i;
        }
    }

    public static void main(String[] args) throws IOException {
        if (args.length < 1) {
            System.err.println("usage: ReadBench FILE [REPEATS]");
            System.exit(2);
        }
        Path file = Path.of(args[0]);
        int repeats = args.length > 1 ? Integer.parseInt(args[1]) : 1;
        boolean splitOnly = args.length > 2 && args[2].equals("--split-only");
        long size = Files.size(file);
        TableSink sink = null;
        double seconds = 0;
        long lines = 0;
        for (int r = 0; r < repeats; r++) {
            sink = new TableSink();
            long t0 = System.nanoTime();
            if (splitOnly) {
                TableSink counter = sink;
                lines = LogReader.readAll(file, (l, no) -> counter.records += l.length() > 0 ? 1 : 0,
                        TailOptions.DEFAULTS);
            } else {
                lines = LogReader.readAll(file, sink, TailOptions.DEFAULTS);
            }
            seconds = (System.nanoTime() - t0) / 1e9;
        }
        long peak = 0;
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            if (pool.getType() == MemoryType.HEAP) {
                peak += pool.getPeakUsage().getUsed();
            }
        }
        System.out.printf(Locale.ROOT,
                "readbench lines=%d records=%d malformed=%d notices=%d last_iter=%d sum_log=%.6g%n",
                lines, sink.records, sink.malformed, sink.notices, sink.lastIter, sink.sumLog);
        System.out.printf(Locale.ROOT,
                "readbench seconds=%.3f records_per_s=%.0f mb_per_s=%.1f peak_heap_mb=%.1f max_heap_mb=%.0f%n",
                seconds, sink.records / seconds, size / 1e6 / seconds, peak / 1e6,
                Runtime.getRuntime().maxMemory() / 1e6);
    }
}
