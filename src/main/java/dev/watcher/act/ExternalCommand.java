package dev.watcher.act;

import java.io.File;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;

/**
 * Runs programs from an argument list, never through a shell, with a given environment; finds them on that
 * environment's PATH (the JVM would search its own PATH, not the child's).
 */
final class ExternalCommand {

    /** What a finished command gave back; {@code exit} is -1 when it was killed for overrunning. */
    record Result(int exit, String out, String err) {
        boolean ok() {
            return exit == 0;
        }

        String brief() {
            String e = err.isBlank() ? out : err;
            e = e.strip();
            if (e.length() > 300) {
                e = e.substring(0, 300) + "...";
            }
            return e.isEmpty() ? "exit " + exit : "exit " + exit + ": " + e;
        }
    }

    private final Map<String, String> env;

    ExternalCommand(Map<String, String> env, String... required) {
        this.env = Map.copyOf(env);
        for (String r : required) {
            if (find(r) == null) {
                throw new IllegalStateException(r + " not found on PATH (" + env.getOrDefault("PATH", "") + ")");
            }
        }
    }

    /** The executable's path for a bare name, or null when it is not on PATH. */
    String find(String name) {
        if (name.contains("/")) {
            return Files.isExecutable(Path.of(name)) ? name : null;
        }
        for (String dir : env.getOrDefault("PATH", "/usr/local/bin:/usr/bin:/bin").split(File.pathSeparator)) {
            if (dir.isEmpty()) {
                continue;
            }
            Path p = Path.of(dir, name);
            if (Files.isRegularFile(p) && Files.isExecutable(p)) {
                return p.toString();
            }
        }
        return null;
    }

    /** Runs {@code argv}, waiting at most {@code timeout}; an overrun is killed and gives exit -1. */
    Result run(List<String> argv, Duration timeout) throws IOException, InterruptedException {
        List<String> cmd = new ArrayList<>(argv);
        String exe = find(cmd.get(0));
        if (exe == null) {
            throw new IOException(cmd.get(0) + " not found on PATH");
        }
        cmd.set(0, exe);
        ProcessBuilder pb = new ProcessBuilder(cmd);
        pb.environment().clear();
        pb.environment().putAll(env);
        pb.redirectInput(ProcessBuilder.Redirect.from(new File("/dev/null")));
        Process p = pb.start();
        CompletableFuture<String> out = drain(p.getInputStream());
        CompletableFuture<String> err = drain(p.getErrorStream());
        if (!p.waitFor(timeout.toMillis(), TimeUnit.MILLISECONDS)) {
            p.destroyForcibly();
            p.waitFor(5, TimeUnit.SECONDS);
            return new Result(-1, out.getNow(""), "killed after " + timeout.toSeconds() + " s without ending");
        }
        return new Result(p.exitValue(), out.join(), err.join());
    }

    Map<String, String> environment() {
        return new HashMap<>(env);
    }

    private static CompletableFuture<String> drain(InputStream in) {
        return CompletableFuture.supplyAsync(() -> {
            try (in) {
                byte[] b = in.readNBytes(64 * 1024);
                in.transferTo(OutputSink.INSTANCE);
                return new String(b, StandardCharsets.UTF_8);
            } catch (IOException e) {
                return "";
            }
        }, Daemons.IO);
    }

    /** Discards what exceeds the kept output. */
    private static final class OutputSink extends java.io.OutputStream {
        static final OutputSink INSTANCE = new OutputSink();

        @Override
        public void write(int b) {
        }

        @Override
        public void write(byte[] b, int off, int len) {
        }
    }
}
