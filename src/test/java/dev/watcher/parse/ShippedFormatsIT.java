package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.IterationRecord;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The format files shipped in test-logs/formats, read from disk, parse the layouts of LAYOUTS.md. The
 * sample lines are the ones LAYOUTS.md shows.
 */
class ShippedFormatsIT {

    private static FormatSpec load(String file) throws Exception {
        Path p = Path.of("test-logs", "formats", file);
        return Formats.load(p.toString(), Files.readString(p, StandardCharsets.UTF_8));
    }

    @Test
    void passLineReadsTheLayoutExample() throws Exception {
        FormatSpec spec = load("pass-line.yaml");
        assertEquals("pass-line", spec.name());
        assertEquals(List.of("mom-x", "mom-y"), spec.families().get("momentum"));
        ListSink s = ListSink.run(spec.newParser(),
                "~ pass 1200 | cont 3.2e-02 | mom-x 1.1e-01 | mom-y 9.0e-02 | probe vmid=0.2134 m/s "
                        + "| probe wall_q=12.7 W",
                "** note: relaxation changed: mom 0.7 -> 0.5",
                "~ pass 1201 | cont 3.1e-02 | mom-x 1.0e-01 | mom-y 8.9e-02 | probe vmid=0.2135 m/s "
                        + "| probe wall_q=12.6 W",
                "** restart from snapshot pass 800",
                "~ pass 801 | cont 5.0e-02 | mom-x 2.0e-01 | mom-y 1.0e-01 | probe vmid=0.2100 m/s "
                        + "| probe wall_q=11.0 W");
        assertEquals(3, s.records.size());
        IterationRecord r = s.records.get(0);
        assertEquals(Map.of("cont", 3.2e-02, "mom-x", 1.1e-01, "mom-y", 9.0e-02), r.residuals().toMap());
        assertEquals(Map.of("vmid", 0.2134, "wall_q", 12.7), r.monitors().toMap());
        assertEquals(1, s.segments.size());
        assertEquals(1, s.records.get(2).segment());
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void sweepBlockReadsTheLayoutExample() throws Exception {
        ListSink s = ListSink.run(load("sweep-block.yaml").newParser(),
                ">> step 12 t=6.000e-02",
                ".. sweep 3 (pass 1203)",
                "   cont   3.20e-02",
                "   mom-x  1.10e-01",
                "   mom-y  9.00e-02",
                "   probe vmid = 0.2134",
                ".. sweep 4 (pass 1204)",
                "   cont   3.00e-02",
                "   mom-x  1.00e-01",
                "   mom-y  8.00e-02",
                "   probe vmid = 0.2136");
        assertEquals(2, s.records.size());
        IterationRecord r = s.records.get(0);
        assertEquals(1203, r.iter());
        assertEquals(12, r.step());
        assertEquals(0.06, r.time());
        assertEquals(3, r.inner());
        assertEquals(Map.of("cont", 3.2e-02, "mom-x", 1.1e-01, "mom-y", 9.0e-02), r.residuals().toMap());
        assertEquals(Map.of("vmid", 0.2136), s.records.get(1).monitors().toMap());
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void tableReadsTheLayoutExample() throws Exception {
        ListSink s = ListSink.run(load("table.yaml").newParser(),
                "# pass      cont        mom-x       mom-y       vmid",
                "  1    1.0000e+00  1.0000e+00  1.0000e+00  0.0000e+00",
                "  2    6.2000e-01  7.1000e-01  6.9000e-01  1.1000e-02");
        assertEquals(2, s.records.size());
        assertEquals(Map.of("cont", 0.62, "mom-x", 0.71, "mom-y", 0.69), s.records.get(1).residuals().toMap());
        assertEquals(Map.of("vmid", 0.011), s.records.get(1).monitors().toMap());
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void passLineReadsTheUnsteadyVariantWithStepTimeAndSweep() throws Exception {
        ListSink s = ListSink.run(load("pass-line.yaml").newParser(),
                "~ pass 1203 | step 12 | t 6.0000e-02 | sweep 3 | cont 3.200e-02 | mom-x 1.100e-01 "
                        + "| probe vmid=0.213400 m/s | probe lid_shear=1.25000 N",
                "~ pass 1204 | step 12 | t 6.0000e-02 | sweep 4 | cont NaN | mom-x Infinity | probe vmid=0.2135 m/s");
        IterationRecord r = s.records.get(0);
        assertEquals(1203, r.iter());
        assertEquals(12, r.step());
        assertEquals(0.06, r.time());
        assertEquals(3, r.inner());
        assertEquals(Map.of("cont", 3.2e-02, "mom-x", 1.1e-01), r.residuals().toMap());
        assertEquals(Map.of("vmid", 0.2134, "lid_shear", 1.25), r.monitors().toMap());
        double[] v = s.records.get(1).residuals().values();
        assertTrue(Double.isNaN(v[0]));
        assertEquals(Double.POSITIVE_INFINITY, v[1]);
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void tableReadsUnsteadyColumnsAndARestartWithAReprintedHeader() throws Exception {
        ListSink s = ListSink.run(load("table.yaml").newParser(),
                "# pass     step         time inner         cont        mom-x         vmid     lid_shear",
                "    1200     12   6.0000e-02     3   3.2000e-02   1.1000e-01    2.1340e-01    1.2500e+00",
                "    1201     12   6.0000e-02     4   3.1000e-02   1.0000e-01    2.1350e-01    1.2510e+00",
                "# restart from snapshot pass 800",
                "# pass     step         time inner         cont        mom-x         vmid     lid_shear",
                "     801      8   4.0000e-02     1   5.0000e-02   2.0000e-01    2.1000e-01    1.2000e+00");
        assertEquals(3, s.records.size());
        IterationRecord r = s.records.get(0);
        assertEquals(12, r.step());
        assertEquals(0.06, r.time());
        assertEquals(3, r.inner());
        assertEquals(List.of("cont", "mom-x"), r.residuals().names());
        assertEquals(List.of("vmid", "lid_shear"), r.monitors().names());
        assertEquals(List.of(0, 0, 1), s.records.stream().map(IterationRecord::segment).toList());
        assertEquals(1, s.segments.size());
        assertEquals(5, s.segments.get(0).line());
        assertTrue(s.malformed.isEmpty());
    }
}
