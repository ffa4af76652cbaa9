package dev.watcher.journal;

import com.fasterxml.jackson.core.type.TypeReference;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.channels.OverlappingFileLockException;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.stream.Stream;

/**
 * A daemon's state directory: the timeline, each run's saved state (read positions, counters), the
 * notice outbox and the series history. One daemon at a time holds it (an OS file lock on {@code lock}); a
 * second one is refused with {@link LockedException}.
 *
 * <p>Run state files are written atomically (write to a temporary file, then rename), so a crash leaves
 * either the old or the new state, never half of one.
 */
public final class StateDir implements AutoCloseable {

    private static final ObjectMapper JSON = new ObjectMapper();

    private final Path dir;
    private final FileChannel lockChannel;
    private final FileLock lock;

    /** Another daemon holds this state directory. */
    public static final class LockedException extends Exception {
        private static final long serialVersionUID = 1L;

        LockedException(Path dir) {
            super("the state directory " + dir + " is in use by another watcher (lock " + dir.resolve("lock")
                    + "); give another one with --state");
        }
    }

    private StateDir(Path dir, FileChannel ch, FileLock lock) {
        this.dir = dir;
        this.lockChannel = ch;
        this.lock = lock;
    }

    /**
     * Opens (creating) {@code dir} and takes its lock. {@code fresh} clears what an earlier daemon left
     * (replay writes a fresh state directory).
     */
    public static StateDir open(Path dir, boolean fresh) throws IOException, LockedException {
        Files.createDirectories(dir);
        FileChannel ch = FileChannel.open(dir.resolve("lock"), StandardOpenOption.CREATE, StandardOpenOption.WRITE);
        FileLock l;
        try {
            l = ch.tryLock();
        } catch (OverlappingFileLockException e) {
            l = null;
        }
        if (l == null) {
            ch.close();
            throw new LockedException(dir);
        }
        ch.truncate(0);
        ch.write(java.nio.ByteBuffer.wrap((ProcessHandle.current().pid() + "\n").getBytes(StandardCharsets.US_ASCII)));
        StateDir s = new StateDir(dir, ch, l);
        if (fresh) {
            s.clear();
        }
        Files.createDirectories(s.runsDir());
        return s;
    }

    private void clear() throws IOException {
        for (String name : new String[] {"timeline.jsonl", "runs", "outbox", "history"}) {
            Path p = dir.resolve(name);
            if (Files.isDirectory(p)) {
                try (Stream<Path> walk = Files.walk(p)) {
                    for (Path x : walk.sorted(Comparator.reverseOrder()).toList()) {
                        Files.deleteIfExists(x);
                    }
                }
            } else {
                Files.deleteIfExists(p);
            }
        }
    }

    public Path dir() {
        return dir;
    }

    public Path defaultTimeline() {
        return dir.resolve("timeline.jsonl");
    }

    public Path outboxDir() {
        return dir.resolve("outbox");
    }

    public Path historyDir() {
        return dir.resolve("history");
    }

    public Path runsDir() {
        return dir.resolve("runs");
    }

    /** The saved state of a run, or an empty map. */
    public Map<String, Object> loadRun(String run) throws IOException {
        Path p = runsDir().resolve(safe(run) + ".json");
        if (!Files.exists(p)) {
            return new LinkedHashMap<>();
        }
        return JSON.readValue(p.toFile(), new TypeReference<LinkedHashMap<String, Object>>() { });
    }

    /** Saves a run's state atomically. */
    public void saveRun(String run, Map<String, Object> state) throws IOException {
        Path p = runsDir().resolve(safe(run) + ".json");
        Path tmp = runsDir().resolve(safe(run) + ".json.tmp");
        Files.write(tmp, JSON.writerWithDefaultPrettyPrinter().writeValueAsBytes(state),
                StandardOpenOption.CREATE, StandardOpenOption.TRUNCATE_EXISTING, StandardOpenOption.WRITE,
                StandardOpenOption.SYNC);
        try {
            Files.move(tmp, p, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            Files.move(tmp, p, StandardCopyOption.REPLACE_EXISTING);
        }
    }

    /** A run name as a file name: anything but letters, digits, dot, dash and underscore becomes '_'. */
    public static String safe(String run) {
        return run.replaceAll("[^A-Za-z0-9._-]", "_");
    }

    @Override
    public void close() throws IOException {
        if (lock.isValid()) {
            lock.release();
        }
        lockChannel.close();
    }
}
