package dev.watcher.demo;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The shipped example logs are what the solver writes (checked on the cheap unsteady ones). */
class TestLogGenIT {

    @TempDir
    Path dir;

    @Test
    void shippedUnsteadyExamplesAreByteForByteWhatTheSolverWrites() throws Exception {
        for (TestLogGen.Example e : TestLogGen.EXAMPLES) {
            if (!e.scenario().equals("big-step")) {
                continue; // the others take longer to compute; same code path
            }
            Path fresh = dir.resolve(e.file());
            ByteArrayOutputStream err = new ByteArrayOutputStream();
            int code = DemoSolverMain.run(new String[] {"--scenario", e.scenario(), "--layout", e.layout(),
                "--out", fresh.toString()}, new PrintStream(err, true, StandardCharsets.UTF_8));
            assertEquals(0, code, err.toString(StandardCharsets.UTF_8));
            Path shipped = Path.of("test-logs", e.file());
            assertArrayEquals(Files.readAllBytes(shipped), Files.readAllBytes(fresh),
                    e.file() + " is stale: regenerate with TestLogGen");
        }
    }

    @Test
    void everyShippedExampleIsWellUnderOneMegabyte() throws Exception {
        for (TestLogGen.Example e : TestLogGen.EXAMPLES) {
            long size = Files.size(Path.of("test-logs", e.file()));
            assertTrue(size < 512 * 1024, e.file() + " is " + size + " bytes");
        }
    }
}
