package dev.watcher.testing;

import static org.junit.jupiter.api.Assertions.fail;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Assumptions;

/**
 * The one-node SLURM cluster that {@code .ci/slurm-up.sh} brings up, as the job-control tests see it. With
 * the {@code CI} environment variable set, a missing or unreachable SLURM fails the calling test class: CI
 * must bring it. Elsewhere the class is skipped when there is no SLURM.
 */
public final class SlurmCluster {

    private SlurmCluster() {
    }

    /** Call from {@code @BeforeAll}: aborts (or, under CI, fails) when sbatch is missing or no node is up. */
    public static void requireUp() throws IOException, InterruptedException {
        boolean ci = System.getenv("CI") != null && !System.getenv("CI").isBlank();
        String problem = null;
        if (run(List.of("bash", "-c", "command -v sbatch")).isBlank()) {
            problem = "sbatch is not on PATH";
        } else if (!run(List.of("bash", "-c", "sinfo -h -o %t 2>&1")).matches("(?s).*\\b(idle|mix|alloc)\\b.*")) {
            problem = "no SLURM node is up (sinfo)";
        }
        if (problem != null) {
            if (ci) {
                fail("CI is set but " + problem + ": .ci/slurm-up.sh must bring SLURM up before the tests");
            }
            Assumptions.abort(problem + " (run .ci/slurm-up.sh as root to test against SLURM)");
        }
    }

    /** Runs a command (a SLURM client, usually) and returns its output and errors, stripped. */
    public static String run(List<String> cmd) throws IOException, InterruptedException {
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        if (!p.waitFor(60, TimeUnit.SECONDS)) {
            p.destroyForcibly();
        }
        return out.strip();
    }

    /** Cancels the jobs a test submitted (those still queued or running). */
    public static void cancel(List<String> jobIds) throws IOException, InterruptedException {
        for (String id : jobIds) {
            run(List.of("scancel", id));
        }
    }
}
