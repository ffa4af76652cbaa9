package dev.watcher.rules;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import dev.watcher.model.Severity;
import dev.watcher.model.StopRequest;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Turns the detections of one run into notices and stop requests, as the rules say. One instance per run,
 * made when the daemon starts following that run; called on the run's thread (not thread-safe). Pure: the
 * only time it knows is its {@link Clock}.
 *
 * <p>What it does with a detection:
 * <ul>
 *   <li>rewrites its severity and remedy per the pattern's rule (the remedy template is filled from the
 *       detection and the run's last values, see the rules file);</li>
 *   <li>tracks open conditions by {@link Detection#conditionKey()}; a condition is notified once it has been
 *       open for the pattern's {@code hold}, and then after the run's {@code gather} wait, so related
 *       conditions that become due meanwhile go out in the same notice (one notice per channel, most severe
 *       detection first);</li>
 *   <li>reminds at the pattern's {@code remind-every} while a notified condition stays open, and sends a
 *       resolved notice when it clears (to the channels that got the first notice), if {@code on-clear};</li>
 *   <li>holds back notices (and stop requests) about muted patterns, and, when {@code outrank} is on, notices
 *       about a condition while another open condition of the run has a higher severity; a held-back
 *       condition still open when the reason ends is notified then;</li>
 *   <li>returns a {@link StopRequest} when the pattern's rule allows a stop at the detection's severity.</li>
 * </ul>
 * Notice ids are deterministic: a hash of run, channel, kind and the leading condition with the iteration it
 * opened at and its severity (reminders add their due time), so replays and restarts give the same ids and the outbox can drop
 * duplicates.
 */
public final class Decider {

    private final RuleSet rules;
    private final String run;
    private final Clock clock;
    private final Instant start;

    private final Map<String, Condition> open = new LinkedHashMap<>();
    private final Set<Condition> batch = new LinkedHashSet<>();
    private final List<Detection> pendingInfo = new ArrayList<>();
    private Instant batchDue;
    private Map<String, Double> lastValues = Map.of();
    private long lastIter;
    private boolean catchingUp;

    /**
     * @param rules the rules in force (per-run overrides are applied here with {@link RuleSet#forRun})
     * @param run   the run's name
     * @param clock the only time source; quiet windows given as a length count from {@code clock.instant()} now
     */
    public Decider(RuleSet rules, String run, Clock clock) {
        this.rules = rules.forRun(run);
        this.run = run;
        this.clock = clock;
        this.start = clock.instant();
    }

    /** The rules as they hold for this run. */
    public RuleSet rules() {
        return rules;
    }

    /**
     * Takes one detection of this run.
     *
     * @param d          a detection of this run
     * @param lastValues the run's latest residual and monitor values by name (may be null); also where the
     *                   daemon passes facts such as {@code core_hours_left} for remedy texts
     */
    public Decision decide(Detection d, Map<String, Double> lastValues) {
        Instant now = clock.instant();
        if (lastValues != null) {
            this.lastValues = clean(lastValues);
        }
        lastIter = Math.max(lastIter, d.iter());
        Detection r = rewrite(d);
        List<Notice> out = new ArrayList<>();
        StopRequest stop = null;
        switch (d.state()) {
            case OPEN: {
                Condition c = open.get(r.conditionKey());
                if (c == null) {
                    c = new Condition(r, now);
                    open.put(c.key, c);
                } else {
                    c.latest = r;
                    if (r.severity().compareTo(c.severity) > 0) {
                        // an escalation is news: the condition goes out again at its new severity
                        c.severity = r.severity();
                        c.notified = false;
                    }
                }
                stop = stopFor(r, now);
                break;
            }
            case RESOLVED: {
                Condition c = open.remove(r.conditionKey());
                if (c != null) {
                    batch.remove(c);
                    if (!catchingUp && c.notified && onClear(c.pattern) && !muted(c.pattern, now)) {
                        out.addAll(resolved(c, r, now));
                    }
                }
                break;
            }
            default:
                if (!catchingUp && !rules.routes(r.pattern()).isEmpty()) {
                    pendingInfo.add(r);
                }
                break;
        }
        if (catchingUp) {
            return new Decision(r, List.of(), null);
        }
        out.addAll(due(now));
        return new Decision(r, out, stop);
    }

    /** Notices that became due with time alone (end of a grouping wait, reminders). Call it every second or so. */
    public List<Notice> tick() {
        if (catchingUp) {
            return List.of();
        }
        return due(clock.instant());
    }

    /**
     * While true (the daemon re-reading a log's history), {@link #decide} keeps track of conditions but sends
     * nothing and requests no stop.
     */
    public void setCatchingUp(boolean catchingUp) {
        this.catchingUp = catchingUp;
    }

    public boolean isCatchingUp() {
        return catchingUp;
    }

    /**
     * Ends catching up: one grouped notice per channel about the conditions still open now (not muted, not
     * outranked), at once: they have lasted through the history already. Conditions that opened and cleared in
     * the history give nothing.
     */
    public List<Notice> caughtUp() {
        catchingUp = false;
        Instant now = clock.instant();
        batch.clear();
        pendingInfo.clear();
        batchDue = null;
        List<Condition> members = new ArrayList<>();
        for (Condition c : open.values()) {
            if (!c.notified && notifiable(c, now)) {
                members.add(c);
            }
        }
        return opened(members, List.of(), now);
    }

    /**
     * Stop requests the rules allow for conditions open now: for the daemon to call after {@link #caughtUp()},
     * since a run that diverged before the daemon started gave its detection during the catching up.
     */
    public List<StopRequest> openStopRequests() {
        Instant now = clock.instant();
        List<StopRequest> out = new ArrayList<>();
        for (Condition c : open.values()) {
            StopRequest s = stopFor(c.latest, now);
            if (s != null) {
                out.add(s);
            }
        }
        return out;
    }

    /** The condition keys open now, in the order they opened. */
    public List<String> openConditions() {
        return List.copyOf(open.keySet());
    }

    // ---- the rules applied

    private Detection rewrite(Detection d) {
        if (d.state() == DetectionState.RESOLVED) {
            return d;
        }
        PatternRule rule = rules.rule(d.pattern());
        Detection r = d;
        if (rule.severity() != null) {
            r = r.withSeverity(rule.severity());
        }
        String template = rule.remedy() != null ? rule.remedy() : r.remedy();
        return r.withRemedy(RemedyText.fill(template, r, lastValues));
    }

    private StopRequest stopFor(Detection r, Instant now) {
        StopRule s = rules.rule(r.pattern()).stop();
        if (!s.isAllowed() || !r.severity().atLeast(s.threshold()) || muted(r.pattern(), now)) {
            return null;
        }
        Map<String, Object> evidence = new LinkedHashMap<>();
        r.evidence().forEach((k, v) -> {
            if (k != null && v != null) {
                evidence.put(k, v);
            }
        });
        return new StopRequest(run, r.pattern(), r.severity(), r.iter(), r.pattern() + ": " + r.summary(),
                evidence, s.gate());
    }

    private Duration hold(String pattern) {
        Duration h = rules.rule(pattern).hold();
        return h != null ? h : rules.delivery().hold();
    }

    private Duration remindEvery(String pattern) {
        Duration h = rules.rule(pattern).remindEvery();
        return h != null ? h : rules.delivery().remindEvery();
    }

    private boolean onClear(String pattern) {
        Boolean b = rules.rule(pattern).onClear();
        return b != null ? b : rules.delivery().onClear();
    }

    private boolean muted(String pattern, Instant now) {
        for (Quiet q : rules.quiet()) {
            if (q.mutes(run, pattern, now, start)) {
                return true;
            }
        }
        return false;
    }

    private boolean outranked(Severity severity, Condition self, Instant now) {
        if (!rules.delivery().outrank()) {
            return false;
        }
        for (Condition o : open.values()) {
            if (o != self && o.severity.compareTo(severity) > 0 && !muted(o.pattern, now)) {
                return true;
            }
        }
        return false;
    }

    private boolean notifiable(Condition c, Instant now) {
        return !muted(c.pattern, now) && !outranked(c.severity, c, now);
    }

    // ---- what is due

    private List<Notice> due(Instant now) {
        List<Notice> out = new ArrayList<>();
        for (Condition c : open.values()) {
            if (c.notified || batch.contains(c)) {
                continue;
            }
            Instant eligible = c.openedAt.plus(hold(c.pattern));
            if (!now.isBefore(eligible) && notifiable(c, now)) {
                if (batchDue == null) {
                    batchDue = eligible.plus(rules.delivery().gather());
                }
                batch.add(c);
            }
        }
        if (!pendingInfo.isEmpty() && batchDue == null) {
            batchDue = now.plus(rules.delivery().gather());
        }
        if (batchDue != null && !now.isBefore(batchDue)) {
            List<Condition> members = new ArrayList<>();
            for (Condition c : batch) {
                if (open.get(c.key) == c && notifiable(c, now)) {
                    members.add(c);
                }
            }
            List<Detection> infos = new ArrayList<>();
            for (Detection i : pendingInfo) {
                if (!muted(i.pattern(), now) && !outranked(i.severity(), null, now)) {
                    infos.add(i);
                }
            }
            batch.clear();
            pendingInfo.clear();
            batchDue = null;
            out.addAll(opened(members, infos, now));
        }
        out.addAll(reminders(now));
        return out;
    }

    /** One notice per channel about these newly due conditions and infos; marks the conditions notified. */
    private List<Notice> opened(List<Condition> members, List<Detection> infos, Instant now) {
        List<Item> items = new ArrayList<>();
        for (Condition c : members) {
            items.add(new Item(c.latest, c.severity, c.identity(), c));
        }
        for (Detection i : infos) {
            items.add(new Item(i, i.severity(), i.conditionKey() + "@" + i.iter() + "/" + i.severity().id(), null));
        }
        items.sort(Comparator.comparing((Item i) -> i.severity).reversed());
        Map<String, List<Item>> byChannel = new LinkedHashMap<>();
        for (Item it : items) {
            for (String ch : rules.routes(it.detection.pattern())) {
                if (it.severity.atLeast(rules.floor(ch))) {
                    byChannel.computeIfAbsent(ch, k -> new ArrayList<>()).add(it);
                }
            }
        }
        List<Notice> out = new ArrayList<>();
        byChannel.forEach((ch, list) -> {
            NoticeKind kind = list.stream().anyMatch(i -> i.condition != null) ? NoticeKind.OPENED : NoticeKind.INFO;
            out.add(notice(ch, kind, list, now, list.get(0).detection.iter(), ""));
            for (Item i : list) {
                if (i.condition != null) {
                    i.condition.sentTo.add(ch);
                }
            }
        });
        for (Condition c : members) {
            // notified even when no channel took it: it must not come back at every tick
            c.notified = true;
            c.lastSent = now;
        }
        return out;
    }

    private List<Notice> reminders(Instant now) {
        Map<String, List<Item>> byChannel = new LinkedHashMap<>();
        Map<String, Instant> dueAt = new LinkedHashMap<>();
        List<Condition> reminded = new ArrayList<>();
        for (Condition c : open.values()) {
            Duration every = remindEvery(c.pattern);
            if (!c.notified || every.isZero() || every.isNegative()) {
                continue;
            }
            Instant due = c.lastSent.plus(every);
            if (now.isBefore(due) || !notifiable(c, now)) {
                continue;
            }
            for (String ch : c.sentTo) {
                byChannel.computeIfAbsent(ch, k -> new ArrayList<>())
                        .add(new Item(c.latest, c.severity, c.identity(), c));
                dueAt.putIfAbsent(ch, due);
            }
            reminded.add(c);
        }
        List<Notice> out = new ArrayList<>();
        byChannel.forEach((ch, list) -> {
            list.sort(Comparator.comparing((Item i) -> i.severity).reversed());
            out.add(notice(ch, NoticeKind.REMINDER, list, now, lastIter, dueAt.get(ch).getEpochSecond() + ""));
        });
        for (Condition c : reminded) {
            c.lastSent = now;
        }
        return out;
    }

    private List<Notice> resolved(Condition c, Detection r, Instant now) {
        List<Notice> out = new ArrayList<>();
        Detection shown = r.withSeverity(c.severity);
        for (String ch : c.sentTo) {
            out.add(notice(ch, NoticeKind.RESOLVED, List.of(new Item(shown, c.severity, c.identity(),
                    c)), now, r.iter(), ""));
        }
        return out;
    }

    private Notice notice(String channel, NoticeKind kind, List<Item> items, Instant now, long iter, String extra) {
        Item lead = items.get(0);
        Detection d = lead.detection;
        String pattern = d.pattern();
        List<Detection> detections = new ArrayList<>();
        Set<String> remedies = new LinkedHashSet<>();
        List<String> others = new ArrayList<>();
        for (Item i : items) {
            detections.add(i.detection);
            if (!i.detection.remedy().isBlank()) {
                remedies.add(i.detection.remedy());
            }
            if (i != lead) {
                others.add(i.detection.summary().isBlank() ? i.detection.pattern()
                        : i.detection.pattern() + " (" + i.detection.summary() + ")");
            }
        }
        StringBuilder summary = new StringBuilder(d.summary());
        if (!others.isEmpty()) {
            if (summary.length() > 0 && summary.charAt(summary.length() - 1) != '.') {
                summary.append('.');
            }
            summary.append(summary.length() == 0 ? "" : " ").append("Also: ").append(String.join("; ", others))
                    .append('.');
        }
        String subject;
        switch (kind) {
            case RESOLVED:
                subject = run + ": " + pattern + " cleared";
                break;
            case REMINDER:
                subject = run + ": still open: " + pattern + " (" + lead.severity.id() + ")";
                break;
            default:
                subject = run + ": " + pattern + " (" + lead.severity.id() + ")";
                break;
        }
        if (items.size() > 1) {
            subject += " and " + (items.size() - 1) + " related";
        }
        String text = kind == NoticeKind.RESOLVED && summary.length() == 0 ? pattern + " cleared" : summary.toString();
        String remedy = kind == NoticeKind.RESOLVED ? "" : String.join("\n", remedies);
        String id = id(channel, kind, lead.identity, extra);
        return new Notice(id, run, channel, kind, lead.severity, subject, text, remedy, detections, lastValues, now,
                iter);
    }

    private String id(String channel, NoticeKind kind, String leadIdentity, String extra) {
        String basis = run + "\n" + channel + "\n" + kind.id() + "\n" + leadIdentity + "\n" + extra;
        try {
            byte[] h = MessageDigest.getInstance("SHA-256").digest(basis.getBytes(StandardCharsets.UTF_8));
            return HexFormat.of().formatHex(h, 0, 16);
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is part of every Java platform", e);
        }
    }

    private static Map<String, Double> clean(Map<String, Double> values) {
        Map<String, Double> m = new LinkedHashMap<>();
        values.forEach((k, v) -> {
            if (k != null && v != null) {
                m.put(k, v);
            }
        });
        return m;
    }

    /** One open condition of the run. */
    private static final class Condition {
        final String key;
        final String pattern;
        final Instant openedAt;
        final long openedIter;
        final Set<String> sentTo = new LinkedHashSet<>();
        Detection latest;
        Severity severity;
        boolean notified;
        Instant lastSent;

        /** The condition as notice ids name it: key, opening iteration and severity (an escalation is new). */
        String identity() {
            return key + "@" + openedIter + "/" + severity.id();
        }

        Condition(Detection d, Instant now) {
            this.key = d.conditionKey();
            this.pattern = d.pattern();
            this.openedAt = now;
            this.openedIter = d.iter();
            this.latest = d;
            this.severity = d.severity();
        }
    }

    /** A detection as a notice shows it, with the identity that names it in notice ids. */
    private record Item(Detection detection, Severity severity, String identity, Condition condition) {
    }
}
