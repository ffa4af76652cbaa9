package dev.watcher.demo;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The demo solver as a real child process writing a real, growing file. */
class DemoSolverMainIT {

    @TempDir
    Path dir;

    private Process start(String... extra) throws IOException {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        List<String> cmd = new java.util.ArrayList<>(List.of(java, "-Xmx64m", "-cp",
                System.getProperty("java.class.path"), DemoSolverMain.class.getName()));
        cmd.addAll(List.of(extra));
        return new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve("stdout.txt").toFile())
                .start();
    }

    private static long passLines(Path log) throws IOException {
        if (!Files.exists(log)) {
            return 0;
        }
        return Files.readAllLines(log).stream().filter(l -> l.startsWith("~ pass ")).count();
    }

    private static void assertConsecutivePasses(List<String> lines) {
        long expected = 1;
        for (String l : lines) {
            if (l.startsWith("~ pass ")) {
                long iter = Long.parseLong(l.substring(7, l.indexOf(' ', 7)));
                assertEquals(expected++, iter, "passes are consecutive and complete");
                assertTrue(l.contains("| probe lid_shear="), "complete line: " + l);
            }
        }
    }

    @Test
    void terminateSignalFinishesTheCurrentLineAndLeavesAClosingNote() throws Exception {
        Path log = dir.resolve("run").resolve("plenum.log");
        Process p = start("--scenario", "converging", "--layout", "pass-line", "--out", log.toString(),
                "--pace-ms", "20");
        await().atMost(60, TimeUnit.SECONDS).until(() -> passLines(log) >= 15);
        p.destroy(); // SIGTERM on Linux
        assertTrue(p.waitFor(30, TimeUnit.SECONDS));
        byte[] bytes = Files.readAllBytes(log);
        assertEquals('\n', bytes[bytes.length - 1], "the file ends with a complete line");
        List<String> lines = Files.readAllLines(log);
        assertTrue(lines.get(lines.size() - 1).startsWith("** note: terminate signal, stopping after pass "),
                lines.get(lines.size() - 1));
        assertConsecutivePasses(lines);
        assertTrue(passLines(log) < Scenario.CONVERGING.iterations(), "stopped early");
    }

    @Test
    void haltFileBesideTheLogStopsTheRunWithExitZero() throws Exception {
        Path log = dir.resolve("fan.log");
        Process p = start("--scenario", "big-step", "--layout", "pass-line", "--out", log.toString(),
                "--pace-ms", "20");
        await().atMost(60, TimeUnit.SECONDS).until(() -> passLines(log) >= 10);
        Files.writeString(dir.resolve(DemoSolverMain.HALT_FILE), "please\n");
        assertTrue(p.waitFor(30, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue());
        List<String> lines = Files.readAllLines(log);
        String last = lines.get(lines.size() - 1);
        assertTrue(last.startsWith("** note: " + DemoSolverMain.HALT_FILE + " found, stopping after pass "), last);
        assertConsecutivePasses(lines);
    }

    @Test
    void blowUpEndsTheLogWithNonFiniteValuesAndExitStatusFour() throws Exception {
        Path log = dir.resolve("roof.log");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = DemoSolverMain.run(new String[] {"--scenario", "runaway", "--layout", "pass-line",
            "--out", log.toString()}, new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(DemoSolverMain.EXIT_BLOWUP, code);
        List<String> lines = Files.readAllLines(log);
        assertTrue(lines.get(lines.size() - 2).contains("mom-x NaN"), lines.get(lines.size() - 2));
        assertTrue(lines.size() < 20, "the runaway case blows up within a few iterations");
        assertTrue(lines.get(lines.size() - 1).startsWith("** note: floating-point blow-up"));
    }

    @Test
    void savedStateResumesWithTheIterationCountContinuingAndTheSameNumbers() throws Exception {
        Path log = dir.resolve("header.log");
        Path state = dir.resolve("header.state");
        PrintStream err = new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8);
        assertEquals(0, DemoSolverMain.run(new String[] {"--scenario", "converging", "--layout", "pass-line",
            "--out", log.toString(), "--iterations", "100", "--save-state", state.toString()}, err));
        assertEquals(0, DemoSolverMain.run(new String[] {"--scenario", "converging", "--layout", "pass-line",
            "--out", log.toString(), "--iterations", "50", "--resume-state", state.toString()}, err));
        List<String> lines = Files.readAllLines(log);
        int banner = lines.indexOf("** restart from snapshot pass 100");
        assertTrue(banner > 0, "declared restart in " + lines);
        assertTrue(lines.get(banner - 1).startsWith("** note: state saved at pass 100"));
        assertConsecutivePasses(lines); // 1..150 without a gap: the count continues

        Path straight = dir.resolve("straight.log");
        assertEquals(0, DemoSolverMain.run(new String[] {"--scenario", "converging", "--layout", "pass-line",
            "--out", straight.toString(), "--iterations", "150"}, err));
        String resumedLast = lines.stream().filter(l -> l.startsWith("~ pass 150 ")).findFirst().orElseThrow();
        String straightLast = Files.readAllLines(straight).stream().filter(l -> l.startsWith("~ pass 150 "))
                .findFirst().orElseThrow();
        assertEquals(straightLast, resumedLast, "the restart is exact");
    }

    @Test
    void badUsageIsExitTwoWithTheKnownScenarios() {
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = DemoSolverMain.run(new String[] {"--scenario", "nope", "--out", dir.resolve("x").toString()},
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(2, code);
        assertTrue(err.toString(StandardCharsets.UTF_8).contains("hot-relaxation"));
    }
}
