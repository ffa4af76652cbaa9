package dev.watcher.demo;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.io.IOException;
import java.io.Writer;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * Writes iteration records in one of the project's invented log layouts (LAYOUTS.md): {@code jsonl},
 * {@code pass-line}, {@code sweep-block} or {@code table}. Each complete line is flushed at once, so a watcher
 * following the file sees whole records as they are made.
 *
 * <p>Residuals print as {@code %.4e} in the table and jsonl, {@code %.3e} in the line layouts; monitors as
 * {@code %.4e} in the table, {@code %.6e} in jsonl and {@code %.6g} in the line layouts; NaN and infinities
 * as {@code NaN}, {@code Infinity}, {@code -Infinity} (quoted strings in jsonl). Not thread-safe; the caller owns (and closes) the writer.
 */
public final class LogWriter {

    /** The invented layouts. */
    public enum Layout {
        JSONL("jsonl"), PASS_LINE("pass-line"), SWEEP_BLOCK("sweep-block"), TABLE("table");

        private final String id;

        Layout(String id) {
            this.id = id;
        }

        /** The layout's name on the command line and in format files. */
        public String id() {
            return id;
        }

        /** The layout of a name, e.g. {@code pass-line}. */
        public static Layout byId(String id) {
            for (Layout l : values()) {
                if (l.id.equals(id)) {
                    return l;
                }
            }
            throw new IllegalArgumentException("unknown layout '" + id + "'; known: jsonl, pass-line, sweep-block, table");
        }
    }

    private final Writer out;
    private final Layout layout;
    private final Map<String, String> units;
    private List<String> headerResiduals;
    private List<String> headerMonitors;
    private boolean headerUnsteady;
    private long lastStep = Long.MIN_VALUE;

    /** A writer without monitor units. */
    public LogWriter(Writer out, Layout layout) {
        this(out, layout, Map.of());
    }

    /**
     * @param out          where lines go; flushed after every line
     * @param layout       the layout to write
     * @param monitorUnits unit per monitor name for the line layouts ({@code probe vmid=0.2134 m/s}); a monitor
     *                     without an entry prints without unit
     */
    public LogWriter(Writer out, Layout layout, Map<String, String> monitorUnits) {
        this.out = out;
        this.layout = layout;
        this.units = Map.copyOf(monitorUnits);
    }

    public Layout layout() {
        return layout;
    }

    /** Writes one record (several lines in {@code sweep-block}, plus a header line in {@code table} when needed). */
    public void write(IterationRecord r) throws IOException {
        switch (layout) {
            case JSONL -> jsonl(r);
            case PASS_LINE -> passLine(r);
            case SWEEP_BLOCK -> sweepBlock(r);
            case TABLE -> table(r);
            default -> throw new IllegalStateException(layout.toString());
        }
    }

    /**
     * Writes a free-text note between records: {@code ** note: TEXT} in the line layouts, {@code # note: TEXT}
     * in the table; jsonl has no place for notes and skips it.
     */
    public void note(String text) throws IOException {
        switch (layout) {
            case PASS_LINE, SWEEP_BLOCK -> line("** note: " + text);
            case TABLE -> line("# note: " + text);
            default -> {
            }
        }
    }

    /**
     * Declares a restart from the snapshot of iteration {@code snapshotIter}: {@code ** restart from snapshot
     * pass N} in the line layouts; in the table the same text as a comment followed by a reprinted header. In
     * jsonl the iteration counter going back is the only sign.
     */
    public void restart(long snapshotIter) throws IOException {
        switch (layout) {
            case PASS_LINE, SWEEP_BLOCK -> line("** restart from snapshot pass " + snapshotIter);
            case TABLE -> {
                line("# restart from snapshot pass " + snapshotIter);
                headerResiduals = null;
            }
            default -> {
            }
        }
        lastStep = Long.MIN_VALUE;
    }

    // ------------------------------------------------------------------ layouts

    private void jsonl(IterationRecord r) throws IOException {
        StringBuilder b = new StringBuilder(160);
        b.append("{\"iter\": ").append(r.iter());
        if (r.hasStep()) {
            b.append(", \"step\": ").append(r.step());
        }
        if (r.hasTime()) {
            b.append(", \"time\": ").append(json(r.time(), "%.6e"));
        }
        if (r.hasInner()) {
            b.append(", \"inner\": ").append(r.inner());
        }
        b.append(", \"residuals\": ");
        jsonObject(b, r.residuals(), "%.4e");
        b.append(", \"monitors\": ");
        jsonObject(b, r.monitors(), "%.6e");
        b.append('}');
        line(b.toString());
    }

    private static void jsonObject(StringBuilder b, Samples s, String fmt) {
        b.append('{');
        for (int i = 0; i < s.size(); i++) {
            if (i > 0) {
                b.append(", ");
            }
            b.append('"').append(s.name(i)).append("\": ").append(json(s.value(i), fmt));
        }
        b.append('}');
    }

    private static String json(double v, String fmt) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, fmt, v) : "\"" + v + "\"";
    }

    private void passLine(IterationRecord r) throws IOException {
        StringBuilder b = new StringBuilder(160);
        b.append("~ pass ").append(r.iter());
        if (r.hasStep()) {
            b.append(" | step ").append(r.step()).append(" | t ").append(num(r.time(), "%.4e"));
            if (r.hasInner()) {
                b.append(" | sweep ").append(r.inner());
            }
        }
        Samples res = r.residuals();
        for (int i = 0; i < res.size(); i++) {
            b.append(" | ").append(res.name(i)).append(' ').append(num(res.value(i), "%.3e"));
        }
        Samples mon = r.monitors();
        for (int i = 0; i < mon.size(); i++) {
            b.append(" | probe ").append(mon.name(i)).append('=').append(num(mon.value(i), "%.6g"));
            String unit = units.get(mon.name(i));
            if (unit != null && !unit.isEmpty()) {
                b.append(' ').append(unit);
            }
        }
        line(b.toString());
    }

    private void sweepBlock(IterationRecord r) throws IOException {
        if (r.hasStep() && r.step() != lastStep) {
            line(">> step " + r.step() + " t=" + num(r.time(), "%.3e"));
            lastStep = r.step();
        }
        long sweep = r.hasInner() ? r.inner() : r.iter();
        line(".. sweep " + sweep + " (pass " + r.iter() + ")");
        Samples res = r.residuals();
        for (int i = 0; i < res.size(); i++) {
            line(String.format(Locale.ROOT, "   %-6s %s", res.name(i), num(res.value(i), "%.3e")));
        }
        Samples mon = r.monitors();
        for (int i = 0; i < mon.size(); i++) {
            line("   probe " + mon.name(i) + " = " + num(mon.value(i), "%.6g"));
        }
    }

    private void table(IterationRecord r) throws IOException {
        boolean unsteady = r.hasStep();
        if (headerResiduals == null || !headerResiduals.equals(r.residuals().names())
                || !headerMonitors.equals(r.monitors().names()) || headerUnsteady != unsteady) {
            headerResiduals = r.residuals().names();
            headerMonitors = r.monitors().names();
            headerUnsteady = unsteady;
            StringBuilder h = new StringBuilder("# pass  ");
            if (unsteady) {
                h.append(String.format(Locale.ROOT, " %6s %12s %5s", "step", "time", "inner"));
            }
            for (String n : headerResiduals) {
                h.append(String.format(Locale.ROOT, " %12s", n));
            }
            for (String n : headerMonitors) {
                h.append(String.format(Locale.ROOT, " %13s", n));
            }
            line(h.toString());
        }
        StringBuilder b = new StringBuilder(String.format(Locale.ROOT, "%8d", r.iter()));
        if (unsteady) {
            b.append(String.format(Locale.ROOT, " %6d %12s %5d", r.step(), num(r.time(), "%.4e"),
                    r.hasInner() ? r.inner() : 0));
        }
        Samples res = r.residuals();
        for (int i = 0; i < res.size(); i++) {
            b.append(String.format(Locale.ROOT, " %12s", num(res.value(i), "%.4e")));
        }
        Samples mon = r.monitors();
        for (int i = 0; i < mon.size(); i++) {
            b.append(String.format(Locale.ROOT, " %13s", num(mon.value(i), "%.4e")));
        }
        line(b.toString());
    }

    private static String num(double v, String fmt) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, fmt, v) : Double.toString(v);
    }

    private void line(String s) throws IOException {
        out.write(s);
        out.write('\n');
        out.flush();
    }
}
