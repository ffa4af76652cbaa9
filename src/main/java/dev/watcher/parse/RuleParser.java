package dev.watcher.parse;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;

/**
 * Reads a line format: each line is tried against the format's rules in order; the first rule whose
 * expression is found says what the line does ({@link LineRule.Action}). Records spread over several lines
 * are assembled until a line opens the next one, a context or restart line comes, a closing line comes, or
 * the input ends ({@link #flush}). A value that is not a number spoils its record: the line is counted
 * ({@code bad-number}) and the record is dropped. A record that ends without any value is counted
 * ({@code bad-shape}), one without an iteration number when the format reads one is counted
 * ({@code missing-field}).
 */
final class RuleParser implements LineParser, LinePieces.Piece {

    private final LineSettings settings;
    private final Common common;
    private final Segments segments = new Segments();
    private final Matcher[] matchers;
    private final Matcher[][] findMatchers;
    private final boolean[][] findGroups; // per rule and find: has equation, monitor, region (3 per find)
    private final Assembly residuals;
    private final Assembly monitors;

    private ParseSink sink;
    private long lineNo;

    // the record being assembled
    private boolean open;
    private boolean spoiled;
    private long iter;
    private long step;
    private double time;
    private long inner;
    private long lastLine;

    // carried from context lines to the records that follow
    private long ctxStep = IterationRecord.NONE;
    private double ctxTime = Double.NaN;
    private long ctxInner = IterationRecord.NONE;
    private String region;

    private final List<int[]> used = new ArrayList<>();

    RuleParser(LineSettings settings) {
        this.settings = settings;
        this.common = settings.common();
        this.residuals = new Assembly(common.repeated());
        this.monitors = new Assembly(common.repeated());
        List<LineRule> rules = settings.rules();
        matchers = new Matcher[rules.size()];
        findMatchers = new Matcher[rules.size()][];
        findGroups = new boolean[rules.size()][];
        for (int r = 0; r < rules.size(); r++) {
            matchers[r] = rules.get(r).match().matcher("");
            List<java.util.regex.Pattern> finds = rules.get(r).finds();
            findMatchers[r] = new Matcher[finds.size()];
            findGroups[r] = new boolean[finds.size() * 3];
            for (int f = 0; f < finds.size(); f++) {
                findMatchers[r][f] = finds.get(f).matcher("");
                List<String> g = LineRule.namedGroups(finds.get(f).pattern());
                findGroups[r][3 * f] = g.contains("equation");
                findGroups[r][3 * f + 1] = g.contains("monitor");
                findGroups[r][3 * f + 2] = g.contains("region");
            }
        }
    }

    @Override
    public void accept(CharSequence line, long lineNo, ParseSink sink) {
        this.sink = sink;
        this.lineNo = lineNo;
        LinePieces.split(line, this);
        this.sink = null;
    }

    @Override
    public void flush(ParseSink sink) {
        this.sink = sink;
        complete();
        this.sink = null;
    }

    @Override
    public void accept(CharSequence s, int from, int to, int rank) {
        if (!common.readsRank(rank)) {
            return;
        }
        List<LineRule> rules = settings.rules();
        for (int r = 0; r < rules.size(); r++) {
            Matcher m = matchers[r];
            m.reset(s).region(from, to);
            if (m.find()) {
                apply(rules.get(r), m, findMatchers[r], findGroups[r], s, to);
                m.reset(""); // do not hold on to a line view that the caller reuses
                return;
            }
            m.reset("");
        }
        if (settings.unmatchedMalformed()) {
            sink.malformed(Malformed.BAD_SHAPE, lineNo, "no rule matches: " + clip(s, from, to));
        }
    }

    private void apply(LineRule rule, Matcher m, Matcher[] finds, boolean[] groups, CharSequence s, int to) {
        switch (rule.action()) {
            case IGNORE:
                return;
            case RESTART:
                complete();
                segments.declare(lineNo, "restart declared: " + clip(s, m.regionStart(), to), sink);
                return;
            case CONTEXT:
                complete();
                if (rule.has("step")) {
                    ctxStep = counter(m, "step");
                }
                if (rule.has("inner")) {
                    ctxInner = counter(m, "inner");
                }
                if (rule.has("time")) {
                    ctxTime = number(m, "time");
                }
                if (rule.has("region") && !rule.has("equation") && !rule.has("monitor")) {
                    setRegion(m);
                }
                return;
            case RECORD:
            case OPEN:
                complete();
                start();
                break;
            case VALUES:
            case CLOSE:
                if (open && rule.has("iteration") && m.group("iteration") != null) {
                    long i = Numbers.parseCounter(m.group("iteration"), 0, m.group("iteration").length());
                    if (i != iter) {
                        complete(); // one line per equation, each carrying its iteration: a new one began
                    }
                }
                if (!open) {
                    start();
                }
                break;
            default:
                break;
        }
        lastLine = lineNo;
        scalars(rule, m);
        pairs(m, rule.has("equation"), rule.has("monitor"), rule.has("region"));
        if (finds.length > 0) {
            used.clear();
            int from = m.end();
            for (int k = 0; k < finds.length; k++) {
                Matcher f = finds[k];
                f.reset(s).region(from, to);
                boolean eq = groups[3 * k];
                boolean mon = groups[3 * k + 1];
                boolean reg = groups[3 * k + 2];
                while (f.find()) {
                    if (f.end() == f.start()) {
                        continue; // an empty match yields nothing
                    }
                    if (overlapsUsed(f.start(), f.end())) {
                        continue;
                    }
                    used.add(new int[] {f.start(), f.end()});
                    pairs(f, eq, mon, reg);
                }
                f.reset("");
            }
        }
        if (rule.action() == LineRule.Action.RECORD || rule.action() == LineRule.Action.CLOSE) {
            complete();
        }
    }

    private boolean overlapsUsed(int a, int b) {
        for (int[] u : used) {
            if (a < u[1] && u[0] < b) {
                return true;
            }
        }
        return false;
    }

    private void start() {
        open = true;
        spoiled = false;
        iter = -1;
        step = ctxStep;
        time = ctxTime;
        inner = ctxInner;
        residuals.begin();
        monitors.begin();
    }

    private void scalars(LineRule rule, Matcher m) {
        if (rule.has("iteration") && m.group("iteration") != null) {
            iter = counter(m, "iteration");
        }
        if (rule.has("step") && m.group("step") != null) {
            step = counter(m, "step");
        }
        if (rule.has("inner") && m.group("inner") != null) {
            inner = counter(m, "inner");
        }
        if (rule.has("time") && m.group("time") != null) {
            time = number(m, "time");
        }
        if (rule.has("region") && !rule.has("equation") && !rule.has("monitor")) {
            setRegion(m);
        }
    }

    private void setRegion(Matcher m) {
        String r = m.group("region");
        region = r == null || r.isBlank() ? null : r.strip();
    }

    private void pairs(Matcher m, boolean eq, boolean mon, boolean reg) {
        String prefix = region;
        if (reg && m.group("region") != null && !m.group("region").isBlank()) {
            prefix = m.group("region").strip();
        }
        if (eq && m.group("equation") != null) {
            double v = number(m, "residual");
            if (!Numbers.isMalformed(v)) {
                residuals.put(named(prefix, m.group("equation")), v);
            }
        }
        if (mon && m.group("monitor") != null) {
            double v = number(m, "value");
            if (!Numbers.isMalformed(v)) {
                monitors.put(named(prefix, m.group("monitor")), v);
            }
        }
    }

    private static String named(String prefix, String name) {
        return prefix == null ? name : prefix + "/" + name;
    }

    private long counter(Matcher m, String group) {
        int a = m.start(group);
        if (a < 0) {
            return IterationRecord.NONE;
        }
        long v = Numbers.parseCounter(m.group(group), 0, m.end(group) - a);
        if (v < 0) {
            spoil("\"" + group + "\": \"" + LinePieces.clip(m.group(group), 60) + "\" is not a whole number");
            return IterationRecord.NONE;
        }
        return v;
    }

    private double number(Matcher m, String group) {
        int a = m.start(group);
        if (a < 0) {
            spoil("no \"" + group + "\" value");
            return Numbers.MALFORMED;
        }
        String text = m.group(group);
        double v = Numbers.parse(text, 0, text.length());
        if (Numbers.isMalformed(v)) {
            spoil("\"" + group + "\": \"" + LinePieces.clip(text, 60) + "\" is not a number");
        }
        return v;
    }

    private void spoil(String detail) {
        sink.malformed(Malformed.BAD_NUMBER, lineNo, detail);
        spoiled = true;
    }

    /** Completes the open record, if any: emits it, or counts why it cannot be. */
    private void complete() {
        if (!open) {
            return;
        }
        open = false;
        if (spoiled) {
            residuals.finish();
            monitors.finish();
            return; // already counted where the bad value was
        }
        if (residuals.isEmpty() && monitors.isEmpty()) {
            sink.malformed(Malformed.BAD_SHAPE, lastLine, "a record without any residual or monitor");
            return;
        }
        long it = iter;
        if (it < 0) {
            if (!settings.countsRecords()) {
                sink.malformed(Malformed.MISSING_FIELD, lastLine, "a record without an iteration number");
                residuals.finish();
                monitors.finish();
                return;
            }
            long last = segments.lastIter();
            it = last == Long.MIN_VALUE ? 1 : last + 1;
        }
        // An inner iteration counts within a time step; with neither a step nor a time the run is steady and
        // the number is only a sweep counter (a steady sweep block prints "sweep N (pass N)").
        long in = step == IterationRecord.NONE && Double.isNaN(time) ? IterationRecord.NONE : inner;
        int segment = segments.before(it, lastLine, sink);
        sink.record(new IterationRecord(it, step, time, in, residuals.finish(), monitors.finish(), segment,
                lastLine));
    }

    private static String clip(CharSequence s, int from, int to) {
        String t = s.subSequence(from, Math.min(to, from + 100)).toString().strip();
        return to - from > 100 ? t + "..." : t;
    }
}
