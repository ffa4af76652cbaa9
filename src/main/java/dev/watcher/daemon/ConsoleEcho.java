package dev.watcher.daemon;

import dev.watcher.model.EventType;
import dev.watcher.model.TimelineEvent;
import java.io.PrintStream;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.List;
import java.util.Locale;
import java.util.function.Consumer;

/**
 * Prints each timeline event as one readable console line, e.g.
 * {@code 02:13:07  cavity  #17  CRIT  single-equation-blowup open   @5120  energy residual rising ...}.
 */
final class ConsoleEcho implements Consumer<TimelineEvent> {

    private static final DateTimeFormatter HMS = DateTimeFormatter.ofPattern("HH:mm:ss").withZone(ZoneId.systemDefault());

    private final PrintStream out;

    ConsoleEcho(PrintStream out) {
        this.out = out;
    }

    @Override
    public void accept(TimelineEvent e) {
        out.println(format(e));
        out.flush();
    }

    static String format(TimelineEvent e) {
        StringBuilder b = new StringBuilder(160);
        b.append(HMS.format(e.at())).append("  ").append(e.run()).append("  #").append(e.seq()).append("  ");
        String sev = e.severity() == null ? "info" : e.severity().id();
        b.append(String.format(Locale.ROOT, "%-9s", sev.toUpperCase(Locale.ROOT)));
        String what;
        if (e.type() == EventType.DETECTION) {
            what = e.pattern();
        } else if (e.type() == EventType.NOTICE) {
            what = "notice " + e.fields().get("channel");
        } else if (e.type() == EventType.ACTION) {
            Object m = e.fields().get("method");
            what = m == null ? "action" : "action " + m;
        } else {
            what = "run";
        }
        b.append(String.format(Locale.ROOT, "%-24s %-10s @%-7d ", what, e.state(), e.iter()));
        Object summary = e.fields().get("summary");
        if (summary == null) {
            summary = e.fields().containsKey("reason") ? e.fields().get("reason") : e.fields().get("error");
        }
        Object eqs = e.fields().get("equations");
        if (e.type() == EventType.DETECTION && eqs instanceof List<?> l && !l.isEmpty() && summary == null) {
            summary = l.toString();
        }
        if (summary != null) {
            b.append(summary);
        }
        return b.toString();
    }
}
