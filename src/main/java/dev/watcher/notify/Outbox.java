package dev.watcher.notify;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import dev.watcher.model.Severity;
import io.vertx.core.json.JsonArray;
import io.vertx.core.json.JsonObject;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The durable outbox: one file per pending notice ({@code <hash of id>.notice.json}), written to a temporary
 * file, forced to disk, moved into place atomically and the directory forced, before the first attempt.
 * Delivered and given-up ids are appended (and forced) to {@code done-ids} before the notice file goes, so
 * a crash between the two never sends a notice twice from our side; the most recent {@code kept} ids are
 * remembered across restarts.
 *
 * <p>Thread-safe (every method synchronized); does blocking file I/O: never call it on an event loop.
 */
final class Outbox {

    private static final Logger LOG = LoggerFactory.getLogger(Outbox.class);
    static final String SUFFIX = ".notice.json";
    static final String DONE_FILE = "done-ids";

    private final Path dir;
    private final Path doneFile;
    private final int kept;
    private final LinkedHashSet<String> done = new LinkedHashSet<>();
    private int doneLines;

    Outbox(Path dir, int kept) throws IOException {
        this.dir = dir;
        this.doneFile = dir.resolve(DONE_FILE);
        this.kept = Math.max(1, kept);
        Files.createDirectories(dir);
        if (Files.exists(doneFile)) {
            for (String line : Files.readAllLines(doneFile, StandardCharsets.UTF_8)) {
                if (!line.isBlank()) {
                    String id = unescape(line.strip());
                    done.remove(id);
                    done.add(id);
                    doneLines++;
                }
            }
            trim();
        }
    }

    Path dir() {
        return dir;
    }

    /** Whether the id was delivered or given up (in this life or a recent earlier one). */
    synchronized boolean isDone(String id) {
        return done.contains(id);
    }

    /**
     * The pending notices, oldest first. Files of done ids are removed; unreadable files are renamed to
     * {@code .bad} and logged, never fatal.
     */
    synchronized List<Notice> load() throws IOException {
        List<Path> files = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir, "*" + SUFFIX)) {
            ds.forEach(files::add);
        }
        List<Notice> out = new ArrayList<>();
        for (Path f : files) {
            Notice n;
            try {
                n = decode(new JsonObject(Files.readString(f, StandardCharsets.UTF_8)));
            } catch (IOException | RuntimeException e) {
                LOG.warn("outbox file {} unreadable ({}); set aside as .bad", f.getFileName(), e.toString());
                Files.move(f, f.resolveSibling(f.getFileName() + ".bad"), StandardCopyOption.REPLACE_EXISTING);
                continue;
            }
            if (done.contains(n.id())) {
                Files.deleteIfExists(f);
            } else {
                out.add(n);
            }
        }
        out.sort(Comparator.comparing((Notice n) -> n.created() == null ? Instant.EPOCH : n.created())
                .thenComparing(Notice::id));
        return out;
    }

    /** Writes a pending notice durably (atomic replace, forced to disk). */
    synchronized void put(Notice n) throws IOException {
        Path target = fileOf(n.id());
        Path tmp = dir.resolve(target.getFileName() + ".tmp");
        byte[] bytes = encode(n).encodePrettily().getBytes(StandardCharsets.UTF_8);
        try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING)) {
            ByteBuffer buf = ByteBuffer.wrap(bytes);
            while (buf.hasRemaining()) {
                ch.write(buf);
            }
            ch.force(true);
        }
        Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        forceDir();
    }

    /** Records the id as done (forced to disk), then removes the notice's file. */
    synchronized void complete(String id) throws IOException {
        if (!done.contains(id)) {
            try (FileChannel ch = FileChannel.open(doneFile, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                    StandardOpenOption.APPEND)) {
                ByteBuffer buf = ByteBuffer.wrap((escape(id) + "\n").getBytes(StandardCharsets.UTF_8));
                while (buf.hasRemaining()) {
                    ch.write(buf);
                }
                ch.force(true);
            }
            done.add(id);
            doneLines++;
            if (doneLines > 2 * kept) {
                trim();
                rewriteDone();
            }
        }
        Files.deleteIfExists(fileOf(id));
        forceDir();
    }

    /** Whether a notice file for the id is on disk (tests). */
    synchronized boolean holds(String id) {
        return Files.exists(fileOf(id));
    }

    private void trim() {
        while (done.size() > kept) {
            String first = done.iterator().next();
            done.remove(first);
        }
    }

    private void rewriteDone() throws IOException {
        Path tmp = dir.resolve(DONE_FILE + ".tmp");
        StringBuilder b = new StringBuilder();
        for (String id : done) {
            b.append(escape(id)).append('\n');
        }
        try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING)) {
            ch.write(ByteBuffer.wrap(b.toString().getBytes(StandardCharsets.UTF_8)));
            ch.force(true);
        }
        Files.move(tmp, doneFile, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        doneLines = done.size();
        forceDir();
    }

    private void forceDir() {
        // makes the rename or removal itself durable; some file systems refuse to open a directory: the
        // data was forced already, so that only widens the window, it never loses the notice
        try (FileChannel ch = FileChannel.open(dir, StandardOpenOption.READ)) {
            ch.force(true);
        } catch (IOException | UnsupportedOperationException e) {
            LOG.debug("cannot force directory {}: {}", dir, e.toString());
        }
    }

    Path fileOf(String id) {
        try {
            byte[] h = MessageDigest.getInstance("SHA-256").digest(id.getBytes(StandardCharsets.UTF_8));
            return dir.resolve(HexFormat.of().formatHex(h, 0, 16) + SUFFIX);
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 unavailable", e);
        }
    }

    // ids are one per line: a line break or backslash inside an id is escaped
    private static String escape(String id) {
        return id.replace("\\", "\\\\").replace("\n", "\\n").replace("\r", "\\r");
    }

    private static String unescape(String s) {
        StringBuilder b = new StringBuilder();
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            if (c == '\\' && i + 1 < s.length()) {
                char d = s.charAt(++i);
                b.append(d == 'n' ? '\n' : d == 'r' ? '\r' : d);
            } else {
                b.append(c);
            }
        }
        return b.toString();
    }

    static JsonObject encode(Notice n) {
        JsonObject o = new JsonObject();
        o.put("id", n.id()).put("run", n.run()).put("channel", n.channel()).put("kind", n.kind().id())
                .put("severity", n.severity().id()).put("subject", n.subject()).put("summary", n.summary())
                .put("remedy", n.remedy()).put("created", n.created() == null ? null : n.created().toString())
                .put("iter", n.iter());
        JsonArray ds = new JsonArray();
        n.detections().forEach(d -> ds.add(NoticeFormat.detectionJson(d)));
        o.put("detections", ds);
        JsonObject lv = new JsonObject();
        n.lastValues().forEach((k, v) -> lv.put(k, v == null || v.isNaN() || v.isInfinite() ? String.valueOf(v)
                : (Object) v));
        o.put("last_values", lv);
        return o;
    }

    static Notice decode(JsonObject o) {
        List<Detection> ds = new ArrayList<>();
        JsonArray arr = o.getJsonArray("detections", new JsonArray());
        for (int i = 0; i < arr.size(); i++) {
            JsonObject d = arr.getJsonObject(i);
            List<String> eqs = new ArrayList<>();
            d.getJsonArray("equations", new JsonArray()).forEach(e -> eqs.add(String.valueOf(e)));
            ds.add(new Detection(d.getString("pattern"),
                    DetectionState.valueOf(d.getString("state").toUpperCase(Locale.ROOT)),
                    Severity.fromId(d.getString("severity")), d.getLong("iter", 0L), eqs, d.getString("monitor"),
                    d.getString("summary"), d.getString("remedy"),
                    d.getJsonObject("evidence", new JsonObject()).getMap()));
        }
        Map<String, Double> lv = new LinkedHashMap<>();
        o.getJsonObject("last_values", new JsonObject()).forEach(e -> lv.put(e.getKey(), toDouble(e.getValue())));
        String created = o.getString("created");
        return new Notice(required(o, "id"), required(o, "run"), required(o, "channel"),
                NoticeKind.valueOf(required(o, "kind").toUpperCase(Locale.ROOT)),
                Severity.fromId(required(o, "severity")), o.getString("subject"), o.getString("summary"),
                o.getString("remedy"), ds, lv, created == null ? null : Instant.parse(created), o.getLong("iter", 0L));
    }

    private static Double toDouble(Object v) {
        if (v instanceof Number num) {
            return num.doubleValue();
        }
        return v == null ? null : Double.valueOf(v.toString());
    }

    private static String required(JsonObject o, String key) {
        String v = o.getString(key);
        if (v == null) {
            throw new IllegalArgumentException("outbox entry lacks '" + key + "'");
        }
        return v;
    }
}
