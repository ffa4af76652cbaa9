package dev.watcher.parse;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import dev.watcher.model.Samples;
import java.util.EnumMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * What a format makes of some lines, in words, for {@code watcher check FORMAT --sample LOG}: the first
 * records, the segments, the malformed lines with their numbers and reasons, and totals. Pure: the caller
 * reads the log.
 */
public final class FormatSample {

    /** How many malformed lines are listed one by one (all are counted). */
    public static final int MAX_MALFORMED_LISTED = 20;

    private FormatSample() {
    }

    /**
     * Parses {@code lines} (numbered from 1) with a fresh parser of {@code spec} and describes the first
     * {@code maxRecords} records, every new segment and up to {@link #MAX_MALFORMED_LISTED} malformed lines,
     * then the totals. Never throws on bad lines.
     */
    public static String describe(FormatSpec spec, List<? extends CharSequence> lines, int maxRecords) {
        StringBuilder out = new StringBuilder();
        out.append(spec instanceof Layout l ? l.toString() : "format " + spec.name()).append('\n');
        if (!spec.families().isEmpty()) {
            spec.families().forEach((f, eqs) -> out.append("family ").append(f).append(": ")
                    .append(String.join(", ", eqs)).append('\n'));
        }
        Map<Malformed, Integer> byKind = new EnumMap<>(Malformed.class);
        int[] totals = new int[3]; // records, malformed, segments
        ParseSink sink = new ParseSink() {
            @Override
            public void record(IterationRecord r) {
                totals[0]++;
                if (totals[0] <= maxRecords) {
                    out.append(describe(r)).append('\n');
                }
            }

            @Override
            public void segment(int segment, long line, String reason) {
                totals[2]++;
                out.append("line ").append(line).append(": segment ").append(segment).append(" starts (")
                        .append(reason).append(")\n");
            }

            @Override
            public void malformed(Malformed kind, long line, String detail) {
                totals[1]++;
                byKind.merge(kind, 1, Integer::sum);
                if (totals[1] <= MAX_MALFORMED_LISTED) {
                    out.append("line ").append(line).append(": malformed, ").append(kind.id()).append(": ")
                            .append(detail).append('\n');
                }
            }
        };
        LineParser parser = spec.newParser();
        long n = 0;
        for (CharSequence line : lines) {
            parser.accept(line, ++n, sink);
        }
        parser.flush(sink);
        out.append(n).append(" lines: ").append(totals[0]).append(totals[0] == 1 ? " record" : " records");
        if (totals[0] > maxRecords) {
            out.append(" (first ").append(maxRecords).append(" shown)");
        }
        out.append(", ").append(totals[2]).append(totals[2] == 1 ? " new segment, " : " new segments, ")
                .append(totals[1]).append(" malformed");
        if (!byKind.isEmpty()) {
            out.append(" (");
            String sep = "";
            for (Map.Entry<Malformed, Integer> e : byKind.entrySet()) {
                out.append(sep).append(e.getKey().id()).append(' ').append(e.getValue());
                sep = ", ";
            }
            out.append(')');
        }
        return out.append('\n').toString();
    }

    /** One record in one line, e.g. {@code line 3: iter 1200 step 12 ... residuals cont=3.2e-02 ...}. */
    public static String describe(IterationRecord r) {
        StringBuilder b = new StringBuilder();
        b.append("line ").append(r.line()).append(": iter ").append(r.iter());
        if (r.hasStep()) {
            b.append(" step ").append(r.step());
        }
        if (r.hasTime()) {
            b.append(" time ").append(fmt(r.time()));
        }
        if (r.hasInner()) {
            b.append(" inner ").append(r.inner());
        }
        if (r.segment() > 0) {
            b.append(" segment ").append(r.segment());
        }
        samples(b, " | residuals", r.residuals());
        samples(b, " | monitors", r.monitors());
        return b.toString();
    }

    private static void samples(StringBuilder b, String label, Samples s) {
        b.append(label);
        if (s.isEmpty()) {
            b.append(" (none)");
        }
        for (int i = 0; i < s.size(); i++) {
            b.append(' ').append(s.name(i)).append('=').append(fmt(s.value(i)));
        }
    }

    private static String fmt(double v) {
        if (Double.isNaN(v) || Double.isInfinite(v)) {
            return Double.toString(v);
        }
        return String.format(Locale.ROOT, "%.4g", v);
    }
}
