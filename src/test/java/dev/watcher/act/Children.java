package dev.watcher.act;

import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

/** Real child processes for the tests, all destroyed at the end. */
final class Children implements AutoCloseable {
    private final List<Process> started = new ArrayList<>();

    /** A bash loop that writes a line every 0.1 s; with {@code trapTerm} it writes "bye" and exits 0 on TERM. */
    Process loop(Path out, String onTerm) throws IOException {
        String script = (onTerm == null ? "" : "trap '" + onTerm + "' TERM; ")
                + "while :; do echo \"~ pass $SECONDS\"; sleep 0.1; done";
        ProcessBuilder pb = new ProcessBuilder("bash", "-c", script);
        pb.redirectErrorStream(true);
        pb.redirectOutput(out.toFile());
        Process p = pb.start();
        started.add(p);
        return p;
    }

    @Override
    public void close() {
        for (Process p : started) {
            p.descendants().forEach(ProcessHandle::destroyForcibly);
            p.destroyForcibly();
        }
    }
}
