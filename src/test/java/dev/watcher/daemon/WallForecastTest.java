package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.demo.Histories;
import dev.watcher.demo.Scenario;
import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detector;
import dev.watcher.detect.Detectors;
import dev.watcher.model.IterationRecord;
import dev.watcher.testing.MutableClock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;

/**
 * The wall-time forecast of a live run: the iteration rate is checked against the records and the times fed
 * (a solver of the project's own numerics, {@link Histories}, writing its log at a pace the test sets on a
 * {@link MutableClock}), and the seconds against the iteration forecasts of a real {@code converged} judge
 * over the same histories: seconds = iterations / rate.
 */
class WallForecastTest {

    private static final Instant T0 = Instant.parse("2026-03-02T21:00:00Z");
    /** The daemon saves a run's state at most every two seconds while records come: one observation per save. */
    private static final Duration SAVE = Duration.ofSeconds(2);

    private static final Map<String, List<IterationRecord>> HISTORIES = new java.util.concurrent.ConcurrentHashMap<>();

    /** The first {@code n} records of a scenario, computed once for the class (the solver is deterministic). */
    private static List<IterationRecord> history(String scenario, int n) {
        return HISTORIES.computeIfAbsent(scenario + " " + n, k -> Histories.run(scenario, n));
    }

    /** A log being written: {@code records} at {@code perSecond} records per second of the clock from {@code start}. */
    private record Writing(List<IterationRecord> records, Instant start, double perSecond) {

        /** The iteration counter of the last record written by {@code t} (0 before the first). */
        long lastIterAt(Instant t) {
            long n = (long) Math.floor(Duration.between(start, t).toMillis() * perSecond / 1000.0 + 1e-9);
            n = Math.min(n, records.size());
            return n <= 0 ? 0 : records.get((int) n - 1).iter();
        }
    }

    /** Observes, at every save for {@code d} of the clock, the last iteration written. */
    private static void follow(WallForecast w, MutableClock clock, Writing log, Duration d) {
        Instant end = clock.instant().plus(d);
        while (clock.instant().isBefore(end)) {
            clock.advance(SAVE);
            w.observe(clock.instant(), log.lastIterAt(clock.instant()));
        }
    }

    /** The snapshot of the standard {@code converged} judge after the first {@code n} records of a history. */
    private static Map<String, Object> convergedAfter(List<IterationRecord> rs, int n) {
        Detector conv = Detectors.standard(DetectSettings.defaults()).stream()
                .filter(d -> d.getClass().getSimpleName().equals("ConvergedDetector")).findFirst().orElseThrow();
        for (IterationRecord r : rs.subList(0, n)) {
            conv.observe(r, d -> { });
        }
        return conv.snapshot();
    }

    /** Every k-th record: a log that prints one iteration in k. */
    private static List<IterationRecord> everyKth(List<IterationRecord> rs, int k) {
        return IntStream.range(0, rs.size()).filter(i -> (i + 1) % k == 0).mapToObj(rs::get).toList();
    }

    @Test
    void noForecastBeforeTheRateIsKnown() {
        List<IterationRecord> rs = history("converging", 1200);
        Map<String, Object> snap = convergedAfter(rs, 400);
        WallForecast w = new WallForecast();
        assertEquals(Map.of(), w.forecast(snap), "nothing observed");
        w.observe(T0, rs.get(399).iter());
        assertEquals(Map.of(), w.forecast(snap), "one observation is not a rate");
        w.observe(T0.plusSeconds(2), rs.get(409).iter());
        w.observe(T0.plusMillis(4900), rs.get(424).iter());
        assertEquals(Map.of(), w.forecast(snap), "4.9 s is shorter than the shortest span (5 s)");
        w.observe(T0.plusSeconds(5), rs.get(424).iter());
        // iterations 400 -> 425 in 5 s (the history's counter advances one per record)
        assertEquals((rs.get(424).iter() - rs.get(399).iter()) / 5.0, w.rate());
        assertEquals(5.0, w.rate());
        assertFalse(w.forecast(snap).isEmpty());
        assertEquals(Map.of(), w.forecast(Map.of("verdict", "not yet")), "a snapshot without equations");
    }

    @Test
    void aCounterThatDoesNotAdvanceGivesNoRate() {
        WallForecast w = new WallForecast();
        w.observe(T0, 700);
        w.observe(T0.plusSeconds(30), 700);
        assertTrue(Double.isNaN(w.rate()));
    }

    @Test
    void theRateCountsIterationsNotRecordsOverTheLastTwoMinutes() {
        // a log that prints every third iteration of the converging run, two records per second
        List<IterationRecord> printed = everyKth(history("converging", 1200), 3);
        MutableClock clock = new MutableClock(T0);
        Writing log = new Writing(printed, T0, 2.0);
        WallForecast w = new WallForecast();
        w.observe(clock.instant(), log.lastIterAt(clock.instant()));
        follow(w, clock, log, Duration.ofSeconds(30));
        assertEquals(30.0, w.spanSeconds(), "all of it while shorter than the window");
        assertEquals((log.lastIterAt(clock.instant()) - log.lastIterAt(T0)) / 30.0, w.rate());
        follow(w, clock, log, Duration.ofSeconds(170));
        Instant now = clock.instant();
        assertEquals(120.0, w.spanSeconds(), "the window: saves every 2 s land on now - 120 s");
        double expected = (log.lastIterAt(now) - log.lastIterAt(now.minus(WallForecast.WINDOW))) / 120.0;
        assertEquals(expected, w.rate());
        assertEquals(6.0, w.rate(), "2 records per second, 3 iterations per record");
    }

    @Test
    void aSlowdownShowsWithinAWindowAndOnlyTheRecentPaceCounts() {
        List<IterationRecord> rs = history("converging", 1200);
        MutableClock clock = new MutableClock(T0);
        WallForecast w = new WallForecast();
        Writing fast = new Writing(rs, T0, 4.0);
        w.observe(T0, 0);
        follow(w, clock, fast, Duration.ofSeconds(200)); // 800 records
        assertEquals(4.0, w.rate());
        // from here the solver slows to one record a second (say, the node is shared now)
        Instant slowFrom = clock.instant();
        List<IterationRecord> rest = rs.subList(800, rs.size());
        Writing slow = new Writing(rest, slowFrom, 1.0);
        follow(w, clock, slow, Duration.ofSeconds(60));
        // half of the window at each pace: (240 + 60) iterations in 120 s
        long before = fast.lastIterAt(clock.instant().minus(WallForecast.WINDOW));
        assertEquals((slow.lastIterAt(clock.instant()) - before) / 120.0, w.rate());
        assertEquals(2.5, w.rate());
        follow(w, clock, slow, Duration.ofSeconds(60));
        assertEquals(1.0, w.rate(), "the whole window at the new pace: the fast start no longer counts");
    }

    @Test
    void aRestartThatSetsTheCounterBackStartsTheWindowAgain() {
        List<IterationRecord> rs = history("restart", 700);
        int back = IntStream.range(1, rs.size()).filter(i -> rs.get(i).iter() < rs.get(i - 1).iter()).findFirst()
                .orElseThrow();
        // the scenario: killed at iteration 300, resumed from the snapshot of 200
        assertEquals(Scenario.RESTART_KILLED_AT, rs.get(back - 1).iter());
        assertEquals(Scenario.RESTART_SNAPSHOT + 1, rs.get(back).iter());
        MutableClock clock = new MutableClock(T0);
        Writing log = new Writing(rs, T0, 2.0);
        WallForecast w = new WallForecast();
        w.observe(T0, 0);
        List<Double> rates = new ArrayList<>();
        Instant end = T0.plusSeconds(rs.size() / 2);
        while (clock.instant().isBefore(end)) {
            clock.advance(SAVE);
            w.observe(clock.instant(), log.lastIterAt(clock.instant()));
            rates.add(w.rate());
        }
        assertTrue(rates.stream().allMatch(r -> Double.isNaN(r) || r == 2.0), rates.toString());
        // the save that sees the counter back starts again: no rate until 5 s have passed
        // save j (from 0) sees the first 4 (j + 1) records: the first to see record `back` (0-based)
        int firstAfter = (int) Math.ceil((back + 1) / 4.0) - 1;
        assertEquals(2.0, rates.get(firstAfter - 1));
        assertTrue(Double.isNaN(rates.get(firstAfter)), "the jump back is not a pace");
        assertEquals(2.0, rates.get(rates.size() - 1));
    }

    @Test
    void secondsAreTheIterationForecastsOverTheRateAndNotConvergingIsCarried() {
        // over-relaxed run at iteration 300: continuity and momentum not converging, energy converging
        Map<String, Object> hot = convergedAfter(history("hot-relaxation", 300), 300);
        // the converging run at iteration 500: the flow equations at target, energy still converging
        Map<String, Object> conv = convergedAfter(history("converging", 1200), 500);
        WallForecast w = new WallForecast();
        w.observe(T0, 1000);
        w.observe(T0.plusSeconds(7), 1000 + 52); // 52 iterations in 7 s
        double rate = 7.429; // 52 / 7 = 7.4286 to four significant digits
        assertEquals(rate, w.rate());
        int converging = 0;
        int notConverging = 0;
        int reached = 0;
        for (Map<String, Object> snap : List.of(hot, conv)) {
            Map<String, Object> out = w.forecast(snap);
            assertEquals(rate, out.get("iterations_per_second"));
            assertEquals(7.0, out.get("rate_seconds"));
            Map<?, ?> eqs = (Map<?, ?>) snap.get("equations");
            Map<?, ?> secs = (Map<?, ?>) out.get("equations");
            assertEquals(eqs.keySet(), secs.keySet(), "every equation with a forecast is carried");
            for (Map.Entry<?, ?> e : eqs.entrySet()) {
                Map<?, ?> f = (Map<?, ?>) e.getValue();
                Map<?, ?> s = (Map<?, ?>) secs.get(e.getKey());
                assertEquals(f.get("forecast"), s.get("forecast"), e.getKey().toString());
                switch ((String) f.get("forecast")) {
                    case "converging" -> {
                        converging++;
                        double it = (Double) f.get("iterations");
                        double lo = (Double) f.get("iterations_low");
                        double hi = (Double) f.get("iterations_high");
                        assertEquals(Math.round(it / rate), s.get("seconds"), e.getKey() + " " + f);
                        assertEquals(Math.round(lo / rate), s.get("seconds_low"), e.getKey() + " " + f);
                        assertEquals(Math.round(hi / rate), s.get("seconds_high"), e.getKey() + " " + f);
                        long sl = (Long) s.get("seconds_low");
                        long sh = (Long) s.get("seconds_high");
                        long s0 = (Long) s.get("seconds");
                        assertTrue(sl <= s0 && s0 <= sh, s.toString());
                    }
                    case "not converging" -> {
                        notConverging++;
                        assertEquals(Map.of("forecast", "not converging"), s, "status only, no time");
                    }
                    case "reached" -> {
                        reached++;
                        assertEquals(0L, s.get("seconds"));
                    }
                    default -> throw new AssertionError("unexpected status in " + f);
                }
            }
        }
        assertEquals(3, notConverging, "hot-relaxation: cont, mom-x, mom-y");
        assertEquals(3, reached, "converging at 500: cont, mom-x, mom-y");
        assertEquals(2, converging, "temp in both");
    }

    @Test
    void aSlowRunKeepsItsRateToFourSignificantDigits() {
        // a long transient: one iteration every seven minutes; saves only come when a record does
        Map<String, Object> snap = convergedAfter(history("converging", 1200), 500);
        WallForecast w = new WallForecast();
        for (int i = 0; i <= 5; i++) {
            w.observe(T0.plusSeconds(420L * i), 500 + i);
        }
        assertEquals(420.0, w.spanSeconds(), "the last interval, longer than the window, is the pace");
        assertEquals(0.002381, w.rate()); // 1 / 420 = 0.00238095...
        Map<?, ?> temp = (Map<?, ?>) ((Map<?, ?>) snap.get("equations")).get("temp");
        Map<?, ?> out = (Map<?, ?>) ((Map<?, ?>) w.forecast(snap).get("equations")).get("temp");
        assertEquals(Math.round((Double) temp.get("iterations") / 0.002381), out.get("seconds"));
    }

    @Test
    void anEarlierTimeIsIgnored() {
        WallForecast w = new WallForecast();
        w.observe(T0, 100);
        w.observe(T0.plusSeconds(10), 150);
        w.observe(T0.plusSeconds(4), 400);
        assertEquals(5.0, w.rate());
    }
}
