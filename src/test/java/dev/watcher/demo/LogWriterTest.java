package dev.watcher.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.io.IOException;
import java.io.StringWriter;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The layouts of LAYOUTS.md, written from hand-made records (the shape of the lines is the contract). */
class LogWriterTest {

    private static final List<String> EQ = List.of("cont", "mom-x");
    private static final List<String> MON = List.of("vmid");

    private static IterationRecord steady(long iter, double c, double m, double v) {
        return IterationRecord.steady(iter, new Samples(EQ, new double[] {c, m}), new Samples(MON, new double[] {v}));
    }

    private static IterationRecord unsteady(long iter, long step, long inner, double c) {
        return new IterationRecord(iter, step, step * 0.005, inner, new Samples(EQ, new double[] {c, 0.11}),
                new Samples(MON, new double[] {0.2134}), 0, 0);
    }

    private static String write(LogWriter.Layout layout, IterationRecord... records) throws IOException {
        StringWriter out = new StringWriter();
        LogWriter w = new LogWriter(out, layout, Map.of("vmid", "m/s"));
        for (IterationRecord r : records) {
            w.write(r);
        }
        return out.toString();
    }

    @Test
    void jsonlWritesOneObjectPerRecordWithNonFiniteValuesAsStrings() throws IOException {
        assertEquals("{\"iter\": 1200, \"residuals\": {\"cont\": 3.2000e-02, \"mom-x\": \"NaN\"}, "
                + "\"monitors\": {\"vmid\": 2.134000e-01}}\n",
                write(LogWriter.Layout.JSONL, steady(1200, 0.032, Double.NaN, 0.2134)));
        assertEquals("{\"iter\": 1203, \"step\": 12, \"time\": 6.000000e-02, \"inner\": 3, \"residuals\": "
                + "{\"cont\": 3.2000e-02, \"mom-x\": 1.1000e-01}, \"monitors\": {\"vmid\": 2.134000e-01}}\n",
                write(LogWriter.Layout.JSONL, unsteady(1203, 12, 3, 0.032)));
    }

    @Test
    void passLineWritesProbesWithUnitsAndBannersBetweenRecords() throws IOException {
        StringWriter out = new StringWriter();
        LogWriter w = new LogWriter(out, LogWriter.Layout.PASS_LINE, Map.of("vmid", "m/s"));
        w.write(steady(1200, 0.032, 0.11, 0.2134));
        w.note("relaxation changed: mom 0.7 -> 0.5");
        w.restart(800);
        w.write(steady(801, 0.05, Double.POSITIVE_INFINITY, 0.21));
        assertEquals("~ pass 1200 | cont 3.200e-02 | mom-x 1.100e-01 | probe vmid=0.213400 m/s\n"
                + "** note: relaxation changed: mom 0.7 -> 0.5\n"
                + "** restart from snapshot pass 800\n"
                + "~ pass 801 | cont 5.000e-02 | mom-x Infinity | probe vmid=0.210000 m/s\n", out.toString());
    }

    @Test
    void sweepBlockOpensAStepOnceAndASweepPerIteration() throws IOException {
        assertEquals(">> step 12 t=6.000e-02\n"
                + ".. sweep 3 (pass 1203)\n"
                + "   cont   3.200e-02\n"
                + "   mom-x  1.100e-01\n"
                + "   probe vmid = 0.213400\n"
                + ".. sweep 4 (pass 1204)\n"
                + "   cont   3.000e-02\n"
                + "   mom-x  1.100e-01\n"
                + "   probe vmid = 0.213400\n",
                write(LogWriter.Layout.SWEEP_BLOCK, unsteady(1203, 12, 3, 0.032), unsteady(1204, 12, 4, 0.03)));
    }

    @Test
    void tableWritesAHeaderOnceAndValuesWithFourDecimals() throws IOException {
        String s = write(LogWriter.Layout.TABLE, steady(1, 1, 1, 0), steady(2, 0.5, 0.25, 0.0125));
        List<String> lines = s.lines().toList();
        assertEquals(3, lines.size());
        assertEquals(List.of("#", "pass", "cont", "mom-x", "vmid"), List.of(lines.get(0).trim().split("\\s+")));
        assertEquals(List.of("2", "5.0000e-01", "2.5000e-01", "1.2500e-02"),
                List.of(lines.get(2).trim().split("\\s+")));
    }
}
