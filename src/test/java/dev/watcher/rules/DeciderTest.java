package dev.watcher.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import dev.watcher.model.Patterns;
import dev.watcher.model.SecretRef;
import dev.watcher.model.Severity;
import dev.watcher.model.StopGate;
import dev.watcher.model.StopRequest;
import dev.watcher.model.WebhookSpec;
import dev.watcher.testing.MutableClock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/**
 * The decider's behaviours, each driven by a hand-moved clock. The behaviours are the ones the rules file
 * promises (grouping, hold, reminders, resolved notices, muting, outranking, per-run overrides, quick
 * channels, stop allowance); the timings below come from the rules text in this test.
 */
class DeciderTest {

    private static final String RULES = String.join("\n",
            "kind: rules",
            "channels:",
            "  - name: ops",
            "    webhook: {url: 'http://127.0.0.1:9/ops'}",
            "  - name: lead",
            "    floor: critical",
            "    webhook: {url: 'http://127.0.0.1:9/lead'}",
            "delivery:",
            "  send-to: all",
            "  hold: 30s",
            "  gather: 10s",
            "  remind-every: 1h",
            "  on-clear: true",
            "  outrank: true",
            "patterns:",
            "  family-divergence:",
            "    severity: critical",
            "    remedy: 'Debug {equations} with first-order upwind.'",
            "    stop: {allowed: true, persist-records: 5}",
            "  single-equation-blowup: {severity: critical}",
            "  stalled-oscillation: {severity: warning, remedy: 'Lower the relaxation factor of {equations}.'}",
            "  residual-level: {severity: info, send-to: [ops]}",
            "  rising-peaks: {severity: warning, on-clear: false, remind-every: never}",
            "  converged:",
            "    severity: warning",
            "    hold: 0",
            "    remedy: 'Meets the configured criteria to stop[; up to {core_hours_left} core-hours left in the"
                    + " allocation].'",
            "quiet:",
            "  - patterns: [inner-stall]",
            "    from: 2026-12-02T00:00:00Z",
            "    until: 2026-12-02T01:00:00Z",
            "  - patterns: [log-silent]",
            "    for: 15m",
            "runs:",
            "  - match: fan-*",
            "    mute: [stalled-oscillation]",
            "");

    private static final Instant T0 = Instant.parse("2026-12-01T23:00:00Z");

    private MutableClock clock;
    private RuleSet rules;

    @BeforeEach
    void setUp() throws Exception {
        clock = new MutableClock(T0);
        rules = RulesLoader.load("test-rules.yaml", RULES, null);
    }

    private static Detection open(String pattern, long iter, Severity s, String... equations) {
        return new Detection(pattern, DetectionState.OPEN, s, iter, List.of(equations), null,
                pattern + " at " + iter, "", Map.of("rise_decades", 1.5));
    }

    private static Detection resolved(String pattern, long iter, String... equations) {
        return new Detection(pattern, DetectionState.RESOLVED, Severity.INFO, iter, List.of(equations), null,
                pattern + " cleared at " + iter, "", Map.of());
    }

    private static Detection info(String pattern, long iter, String... equations) {
        return new Detection(pattern, DetectionState.INFO, Severity.INFO, iter, List.of(equations), null,
                pattern + " at " + iter, "", Map.of());
    }

    private void at(long seconds) {
        clock.set(T0.plusSeconds(seconds));
    }

    private static List<String> channels(List<Notice> ns) {
        return ns.stream().map(Notice::channel).toList();
    }

    @Test
    void rewritesSeverityAndFillsTheRemedyTemplate() {
        Decider d = new Decider(rules, "tunnel", clock);
        Decision dec = d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.WARNING, "mom-x", "mom-y"), Map.of());
        assertEquals(Severity.CRITICAL, dec.detection().severity());
        assertEquals("Debug mom-x, mom-y with first-order upwind.", dec.detection().remedy());
        assertEquals(Map.of("rise_decades", 1.5), dec.detection().evidence());
    }

    @Test
    void convergedRemedyNamesTheCoreHoursLeftOnlyWhenKnown() {
        Decider d = new Decider(rules, "tunnel", clock);
        Decision known = d.decide(info(Patterns.CONVERGED, 900), Map.of("core_hours_left", 312.4, "cont", 1e-6));
        assertEquals("Meets the configured criteria to stop; up to 312 core-hours left in the allocation.",
                known.detection().remedy());
        Decider e = new Decider(rules, "tunnel", clock);
        Decision unknown = e.decide(info(Patterns.CONVERGED, 900), Map.of("cont", 1e-6));
        assertEquals("Meets the configured criteria to stop.", unknown.detection().remedy());
    }

    @Test
    void conditionThatClearsBeforeItsHoldEndsIsNeverNotified() {
        Decider d = new Decider(rules, "tunnel", clock);
        assertTrue(d.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of())
                .notices().isEmpty());
        at(20);
        assertTrue(d.tick().isEmpty());
        assertTrue(d.decide(resolved(Patterns.STALLED_OSCILLATION, 160, "temp"), Map.of()).notices().isEmpty());
        at(600);
        assertTrue(d.tick().isEmpty(), "no opened notice and no resolved notice for an unnotified condition");
    }

    @Test
    void conditionThatPersistsIsNotifiedAfterHoldAndGatherToChannelsAtOrAboveTheirFloor() {
        Decider d = new Decider(rules, "tunnel", clock);
        d.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of("temp", 2e-3));
        at(29);
        assertTrue(d.tick().isEmpty(), "hold of 30s not over");
        at(30);
        assertTrue(d.tick().isEmpty(), "gathering for 10s");
        at(39);
        assertTrue(d.tick().isEmpty());
        at(40);
        List<Notice> ns = d.tick();
        assertEquals(List.of("ops"), channels(ns), "lead takes critical only");
        Notice n = ns.get(0);
        assertEquals(NoticeKind.OPENED, n.kind());
        assertEquals(Severity.WARNING, n.severity());
        assertEquals("tunnel: stalled-oscillation (warning)", n.subject());
        assertEquals("Lower the relaxation factor of temp.", n.remedy());
        assertEquals(Map.of("temp", 2e-3), n.lastValues());
        assertEquals(T0.plusSeconds(40), n.created());
        assertEquals(100, n.iter());
        at(100);
        assertTrue(d.tick().isEmpty(), "sent once");
    }

    @Test
    void relatedDetectionsDuringTheGatherWaitGoOutAsOneNoticePerChannel() {
        Decider d = new Decider(rules, "header", clock);
        d.decide(open(Patterns.SINGLE_EQUATION_BLOWUP, 100, Severity.CRITICAL, "temp"), Map.of());
        at(5);
        d.decide(open(Patterns.FAMILY_DIVERGENCE, 105, Severity.CRITICAL, "mom-x", "mom-y"), Map.of());
        at(30);
        assertTrue(d.tick().isEmpty());
        at(35);
        assertTrue(d.tick().isEmpty(), "the second joins the wait started by the first");
        at(40);
        List<Notice> ns = d.tick();
        assertEquals(List.of("ops", "lead"), channels(ns));
        for (Notice n : ns) {
            assertEquals(2, n.detections().size());
            assertEquals(Patterns.SINGLE_EQUATION_BLOWUP, n.pattern());
            assertEquals("header: single-equation-blowup (critical) and 1 related", n.subject());
            assertTrue(n.summary().contains("Also: family-divergence"), n.summary());
        }
        // a later one is a notice of its own
        at(50);
        d.decide(open(Patterns.NON_FINITE, 150, Severity.CRITICAL, "temp"), Map.of());
        at(89);
        assertTrue(d.tick().isEmpty());
        at(90);
        List<Notice> later = d.tick();
        assertEquals(2, later.size());
        assertEquals(1, later.get(0).detections().size());
        assertEquals(Patterns.NON_FINITE, later.get(0).pattern());
    }

    @Test
    void remindsWhileTheConditionStaysOpenAndStopsWhenItClears() {
        Decider d = new Decider(rules, "header", clock);
        d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x", "mom-y"), Map.of());
        at(40);
        assertEquals(2, d.tick().size());
        at(40 + 3599);
        assertTrue(d.tick().isEmpty());
        at(40 + 3600);
        List<Notice> first = d.tick();
        assertEquals(List.of("ops", "lead"), channels(first));
        assertTrue(first.stream().allMatch(n -> n.kind() == NoticeKind.REMINDER));
        assertEquals("header: still open: family-divergence (critical)", first.get(0).subject());
        at(40 + 7200);
        List<Notice> second = d.tick();
        assertEquals(2, second.size());
        assertNotEquals(first.get(0).id(), second.get(0).id(), "each reminder is a notice of its own");
        at(40 + 7300);
        List<Notice> clear = d.decide(resolved(Patterns.FAMILY_DIVERGENCE, 800, "mom-x", "mom-y"), Map.of())
                .notices();
        assertEquals(List.of("ops", "lead"), channels(clear));
        assertTrue(clear.stream().allMatch(n -> n.kind() == NoticeKind.RESOLVED));
        assertEquals("header: family-divergence cleared", clear.get(0).subject());
        assertEquals(Severity.CRITICAL, clear.get(0).severity());
        at(40 + 20000);
        assertTrue(d.tick().isEmpty());
    }

    @Test
    void conditionThatEscalatesToAHigherSeverityIsNotifiedAgain() {
        Decider d = new Decider(rules, "pump", clock);
        d.decide(open(Patterns.INNER_STALL, 100, Severity.WARNING, "cont"), Map.of());
        at(40);
        List<Notice> first = d.tick();
        assertEquals(List.of("ops"), channels(first));
        at(100);
        d.decide(open(Patterns.INNER_STALL, 180, Severity.WARNING, "cont"), Map.of());
        assertTrue(d.tick().isEmpty(), "the same condition again at the same severity is no news");
        // its hold and gather time have long passed: the escalation goes out at once
        List<Notice> escalated = d.decide(open(Patterns.INNER_STALL, 200, Severity.CRITICAL, "cont"), Map.of())
                .notices();
        assertEquals(List.of("ops", "lead"), channels(escalated));
        assertEquals(Severity.CRITICAL, escalated.get(0).severity());
        assertNotEquals(first.get(0).id(), escalated.get(0).id(), "a new id, so the outbox does not drop it");
    }

    @Test
    void patternWithoutOnClearAndWithoutRemindersSendsOnlyItsFirstNotice() {
        Decider d = new Decider(rules, "pump", clock);
        d.decide(open(Patterns.RISING_PEAKS, 100, Severity.WARNING, "cont"), Map.of());
        at(40);
        assertEquals(1, d.tick().size());
        at(40 + 3 * 3600);
        assertTrue(d.tick().isEmpty());
        assertTrue(d.decide(resolved(Patterns.RISING_PEAKS, 300, "cont"), Map.of()).notices().isEmpty());
    }

    @Test
    void absoluteQuietWindowHoldsBackUntilItEndsThenNotifiesIfStillOpen() {
        Decider d = new Decider(rules, "pump", clock);
        clock.set(Instant.parse("2026-12-02T00:10:00Z"));
        d.decide(open(Patterns.INNER_STALL, 100, Severity.WARNING, "cont"), Map.of());
        clock.set(Instant.parse("2026-12-02T00:59:59Z"));
        assertTrue(d.tick().isEmpty());
        clock.set(Instant.parse("2026-12-02T01:00:00Z"));
        List<Notice> ns = d.tick();
        assertEquals(1, ns.size());
        assertEquals(Patterns.INNER_STALL, ns.get(0).pattern());
    }

    @Test
    void quietWindowGivenAsALengthCountsFromTheStart() {
        Decider d = new Decider(rules, "pump", clock);
        at(60);
        d.decide(open(Patterns.LOG_SILENT, 100, Severity.WARNING), Map.of());
        at(15 * 60 - 1);
        assertTrue(d.tick().isEmpty());
        at(15 * 60);
        assertEquals(1, d.tick().size());
    }

    @Test
    void higherSeverityOutranksALowerOneOfTheSameRunUntilItClears() {
        Decider d = new Decider(rules, "header", clock);
        d.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of());
        d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x", "mom-y"), Map.of());
        at(40);
        List<Notice> ns = d.tick();
        assertEquals(List.of("ops", "lead"), channels(ns));
        assertTrue(ns.stream().allMatch(n -> n.detections().size() == 1
                && n.pattern().equals(Patterns.FAMILY_DIVERGENCE)));
        at(300);
        assertTrue(d.tick().isEmpty());
        List<Notice> after = d.decide(resolved(Patterns.FAMILY_DIVERGENCE, 400, "mom-x", "mom-y"), Map.of())
                .notices();
        List<Notice> opened = after.stream().filter(n -> n.kind() == NoticeKind.OPENED).toList();
        assertEquals(List.of("ops"), channels(opened), "the lower one, still open, goes out once the higher clears");
        assertEquals(Patterns.STALLED_OSCILLATION, opened.get(0).pattern());
        assertEquals(2, after.stream().filter(n -> n.kind() == NoticeKind.RESOLVED).count());
    }

    @Test
    void outrankingCanBeTurnedOff() throws Exception {
        RuleSet off = RulesLoader.load("off.yaml", "kind: rules\nextends: default\ndelivery: {outrank: false}\n",
                rules);
        Decider d = new Decider(off, "header", clock);
        d.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of());
        d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x", "mom-y"), Map.of());
        at(40);
        Notice ops = d.tick().get(0);
        assertEquals(2, ops.detections().size());
        assertEquals(Patterns.FAMILY_DIVERGENCE, ops.pattern(), "most severe first");
    }

    @Test
    void perRunOverrideMutesAPatternOnlyForTheMatchingRuns() {
        Decider fan = new Decider(rules, "fan-3", clock);
        Decider other = new Decider(rules, "header", clock);
        fan.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of());
        other.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of());
        at(3600);
        assertTrue(fan.tick().isEmpty());
        assertEquals(1, other.tick().size());
    }

    @Test
    void quickChannelsGetWarningAndAboveOfEveryPatternAndTheirResolvedNotices() {
        RuleSet withQuick = rules.withQuickChannels(List.of(new WebhookSpec("quick",
                SecretRef.ofLiteral("http://127.0.0.1:9/q"), null, "native", Duration.ofSeconds(5), 3,
                Duration.ofMinutes(1))));
        assertEquals(List.of("ops", "quick"), withQuick.routes(Patterns.RESIDUAL_LEVEL));
        Decider d = new Decider(withQuick, "header", clock);
        d.decide(info(Patterns.RESIDUAL_LEVEL, 50, "cont"), Map.of());
        at(10);
        List<Notice> infos = d.tick();
        assertEquals(List.of("ops"), channels(infos), "info is below the quick channels' floor");
        assertEquals(NoticeKind.INFO, infos.get(0).kind());
        d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x"), Map.of());
        at(50);
        assertEquals(List.of("ops", "lead", "quick"), channels(d.tick()));
        List<Notice> clear = d.decide(resolved(Patterns.FAMILY_DIVERGENCE, 200, "mom-x"), Map.of()).notices();
        assertTrue(channels(clear).contains("quick"));
    }

    @Test
    void stopIsRequestedOnlyWhereTheRulesAllowIt() {
        Decider d = new Decider(rules, "header", clock);
        StopRequest s = d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.WARNING, "mom-x", "mom-y"),
                Map.of()).stop();
        assertNotNull(s, "allowed, and the rules raise the severity to critical");
        assertEquals("header", s.run());
        assertEquals(Patterns.FAMILY_DIVERGENCE, s.pattern());
        assertEquals(100, s.iter());
        assertEquals(5, s.gate().persistRecords());
        assertEquals(StopGate.DEFAULT.minRunAge(), s.gate().minRunAge(), "unsaid gate fields keep their default");
        assertEquals(Map.of("rise_decades", 1.5), s.evidence());
        assertNull(d.decide(open(Patterns.STALLED_OSCILLATION, 100, Severity.WARNING, "temp"), Map.of()).stop());
        assertNull(d.decide(open(Patterns.SINGLE_EQUATION_BLOWUP, 100, Severity.CRITICAL, "k"), Map.of()).stop());
        assertNull(d.decide(resolved(Patterns.FAMILY_DIVERGENCE, 200, "mom-x", "mom-y"), Map.of()).stop());
    }

    @Test
    void stopBelowTheRulesSeverityOrInAQuietWindowIsNotRequested() throws Exception {
        String text = "kind: rules\npatterns:\n  stalled-oscillation:\n    stop: {allowed: true, at-severity: critical}\n"
                + "  log-silent:\n    stop: {allowed: true, at-severity: warning}\nquiet:\n  - patterns: [log-silent]\n"
                + "    for: 1h\n";
        Decider d = new Decider(RulesLoader.load("s.yaml", text, null), "pump", clock);
        assertNull(d.decide(open(Patterns.STALLED_OSCILLATION, 10, Severity.WARNING, "temp"), Map.of()).stop());
        assertNotNull(d.decide(open(Patterns.STALLED_OSCILLATION, 10, Severity.CRITICAL, "cont"), Map.of()).stop());
        assertNull(d.decide(open(Patterns.LOG_SILENT, 10, Severity.WARNING), Map.of()).stop());
    }

    @Test
    void defaultRulesStopOnNonFiniteAtOnce() {
        Decider d = new Decider(RulesLoader.defaults(), "pump", clock);
        StopRequest s = d.decide(open(Patterns.NON_FINITE, 77, Severity.WARNING, "omega"), Map.of()).stop();
        assertNotNull(s);
        assertEquals(Severity.CRITICAL, s.severity());
        assertEquals(1, s.gate().persistRecords());
        assertEquals(Duration.ZERO, s.gate().minRunAge());
    }

    @Test
    void whileCatchingUpNothingIsSentAndAfterwardsOnlyStillOpenConditions() {
        Decider d = new Decider(rules, "header", clock);
        d.setCatchingUp(true);
        List<Decision> ds = new ArrayList<>();
        ds.add(d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x", "mom-y"), Map.of()));
        ds.add(d.decide(open(Patterns.RISING_PEAKS, 120, Severity.WARNING, "cont"), Map.of()));
        at(100);
        ds.add(d.decide(resolved(Patterns.RISING_PEAKS, 300, "cont"), Map.of()));
        ds.add(d.decide(open(Patterns.SINGLE_EQUATION_BLOWUP, 400, Severity.CRITICAL, "temp"), Map.of()));
        ds.add(d.decide(info(Patterns.RESIDUAL_LEVEL, 450, "cont"), Map.of()));
        assertTrue(ds.stream().allMatch(x -> x.notices().isEmpty() && x.stop() == null));
        assertEquals(Severity.CRITICAL, ds.get(0).detection().severity(), "the rules still rewrite the detection");
        assertTrue(d.tick().isEmpty());
        at(200);
        List<Notice> ns = d.caughtUp();
        assertFalse(d.isCatchingUp());
        assertEquals(List.of("ops", "lead"), channels(ns));
        for (Notice n : ns) {
            assertEquals(List.of(Patterns.FAMILY_DIVERGENCE, Patterns.SINGLE_EQUATION_BLOWUP),
                    n.detections().stream().map(Detection::pattern).toList());
        }
        List<StopRequest> stops = d.openStopRequests();
        assertEquals(1, stops.size());
        assertEquals(Patterns.FAMILY_DIVERGENCE, stops.get(0).pattern());
        at(300);
        assertTrue(d.tick().isEmpty(), "no second opened notice");
    }

    private List<Notice> scenario(Instant start) {
        MutableClock c = new MutableClock(start);
        Decider d = new Decider(rules, "header", c);
        List<Notice> out = new ArrayList<>();
        out.addAll(d.decide(open(Patterns.FAMILY_DIVERGENCE, 100, Severity.CRITICAL, "mom-x", "mom-y"), Map.of())
                .notices());
        c.advance(Duration.ofSeconds(40));
        out.addAll(d.tick());
        c.advance(Duration.ofSeconds(40));
        out.addAll(d.decide(resolved(Patterns.FAMILY_DIVERGENCE, 300, "mom-x", "mom-y"), Map.of()).notices());
        return out;
    }

    @Test
    void noticeIdsAreTheSameWhenTheSameLogIsReadAgainLater() {
        List<Notice> first = scenario(T0);
        List<Notice> again = scenario(T0.plus(Duration.ofDays(3)));
        assertEquals(4, first.size());
        assertEquals(first.stream().map(Notice::id).toList(), again.stream().map(Notice::id).toList());
        assertEquals(4, first.stream().map(Notice::id).distinct().count(), "channel and kind make ids differ");
        assertTrue(first.get(0).id().matches("[0-9a-f]{32}"));
    }

    @Test
    void defaultRemediesSpeakTheTrade() {
        // common practice, no published source: the classic readings of a residual plot
        RuleSet d = RulesLoader.defaults();
        assertTrue(d.rule(Patterns.SINGLE_EQUATION_BLOWUP).remedy().contains("local mesh trouble spot"));
        String family = d.rule(Patterns.FAMILY_DIVERGENCE).remedy();
        assertTrue(family.contains("first-order upwind") && family.contains("not as the fix"), family);
        assertTrue(d.rule(Patterns.STALLED_OSCILLATION).remedy().contains("relaxation factor"));
        assertTrue(d.rule(Patterns.RISING_PEAKS).remedy().contains("time step"));
        assertTrue(d.rule(Patterns.INNER_STALL).remedy().contains("inner iterations"));
        Decider dec = new Decider(d, "pump", clock);
        Detection converged = dec.decide(info(Patterns.CONVERGED, 5000), Map.of("core_hours_left", 48.0))
                .detection();
        assertTrue(converged.remedy().startsWith("Meets the configured criteria to stop; up to 48 core-hours left"
                + " in the allocation."), converged.remedy());
        Detection nan = new Decider(d, "pump", clock).decide(open(Patterns.NON_FINITE, 9, Severity.CRITICAL),
                Map.of()).detection();
        assertTrue(nan.remedy().startsWith("A value went NaN or infinite: the solution"), nan.remedy());
    }
}
