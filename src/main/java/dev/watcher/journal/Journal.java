package dev.watcher.journal;

import com.fasterxml.jackson.core.JsonGenerator;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import dev.watcher.model.EventSink;
import dev.watcher.model.EventType;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.time.format.DateTimeFormatter;
import java.time.temporal.ChronoUnit;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * The event timeline: an append-only JSON Lines file, one event per line, each written to the file before
 * {@link #append} returns and, for the daemon, forced to the disk too (a crash may lose at most the event
 * being written, never an earlier one). A replay's timeline, rebuilt from the log by running the replay
 * again, is forced once when closed instead of after every event ({@link #open(Path, Clock, Consumer,
 * boolean, boolean)}): a forced write costs milliseconds on a real disk, and a replay may write thousands.
 *
 * <p>Resume: on open it reads the existing file, drops an unterminated last line (the event being written
 * when the previous daemon died), and learns per run the last {@code seq} and how many <em>stream events</em>
 * it already holds. Stream events are those that follow from the log alone (detections of replayable
 * patterns and {@code run}/{@code segment} events): a daemon that re-reads a log from its start produces
 * them again in the same order, and the journal skips exactly as many as it already has, so nothing is lost
 * or repeated and {@code seq} continues.
 *
 * <p>Thread-safe: stages on any thread append; appends are serialized.
 */
public final class Journal implements EventSink, AutoCloseable {

    static final DateTimeFormatter AT = DateTimeFormatter.ofPattern("yyyy-MM-dd'T'HH:mm:ss.SSS'Z'")
            .withZone(ZoneOffset.UTC);

    private static final ObjectMapper JSON = new ObjectMapper()
            .configure(SerializationFeature.FAIL_ON_EMPTY_BEANS, false)
            .configure(JsonGenerator.Feature.AUTO_CLOSE_TARGET, false);

    private final Path file;
    private final FileChannel channel;
    private final Clock clock;
    private final Consumer<TimelineEvent> echo;
    private final Map<String, Long> lastSeq = new HashMap<>();
    private final Map<String, Long> streamHeld = new HashMap<>();
    private final Map<String, Long> streamSeen = new HashMap<>();
    private final List<Consumer<TimelineEvent>> listeners = new ArrayList<>();
    private final boolean forceEach;
    private boolean closed;

    private Journal(Path file, Clock clock, Consumer<TimelineEvent> echo, boolean fresh, boolean forceEach)
            throws IOException {
        this.file = file;
        this.forceEach = forceEach;
        this.clock = clock;
        this.echo = echo == null ? e -> { } : echo;
        Path parent = file.toAbsolutePath().getParent();
        if (parent != null) {
            Files.createDirectories(parent);
        }
        if (fresh) {
            Files.deleteIfExists(file);
        }
        this.channel = FileChannel.open(file, StandardOpenOption.CREATE, StandardOpenOption.READ,
                StandardOpenOption.WRITE);
        learnExisting();
    }

    /**
     * Opens (creating if needed) the timeline at {@code file}. {@code fresh} starts a new file ({@code replay});
     * otherwise the existing events are kept and their counters learnt. {@code echo} sees every event written
     * (the console line), may be null.
     */
    public static Journal open(Path file, Clock clock, Consumer<TimelineEvent> echo, boolean fresh)
            throws IOException {
        return new Journal(file, clock, echo, fresh, true);
    }

    /**
     * As {@link #open(Path, Clock, Consumer, boolean)}; {@code forceEachEvent} false writes each event at once
     * (readers of the file see it) but forces the file to the disk only when the journal is closed. For a
     * timeline that can be made again from its input ({@code replay}); the daemon's timeline forces each event.
     */
    public static Journal open(Path file, Clock clock, Consumer<TimelineEvent> echo, boolean fresh,
            boolean forceEachEvent) throws IOException {
        return new Journal(file, clock, echo, fresh, forceEachEvent);
    }

    public Path file() {
        return file;
    }

    /** Also tells {@code l} about every event written (live view, metrics). */
    public synchronized void addListener(Consumer<TimelineEvent> l) {
        listeners.add(l);
    }

    private void learnExisting() throws IOException {
        long size = channel.size();
        if (size == 0) {
            return;
        }
        byte[] all = Files.readAllBytes(file);
        int end = all.length;
        while (end > 0 && all[end - 1] != '\n') {
            end--; // an unterminated last line is the event being written when the daemon died
        }
        if (end < all.length) {
            channel.truncate(end);
        }
        int start = 0;
        for (int i = 0; i < end; i++) {
            if (all[i] == '\n') {
                if (i > start) {
                    learnLine(new String(all, start, i - start, StandardCharsets.UTF_8));
                }
                start = i + 1;
            }
        }
    }

    private void learnLine(String line) {
        try {
            JsonNode n = JSON.readTree(line);
            String run = n.path("run").asText();
            long seq = n.path("seq").asLong();
            lastSeq.merge(run, seq, Math::max);
            if (isStream(EventType.fromId(n.path("type").asText()), n.path("state").asText(),
                    n.path("pattern").asText(null))) {
                streamHeld.merge(run, 1L, Long::sum);
            }
        } catch (IOException e) {
            // a line we cannot read is not ours to repair; it neither counts nor stops us
        }
    }

    /** True for events that follow from the log alone and come again, in order, when it is re-read. */
    public static boolean isStream(EventType type, String state, String pattern) {
        if (type == EventType.DETECTION) {
            return pattern != null && dev.watcher.model.Patterns.isReplayable(pattern);
        }
        return type == EventType.RUN && "segment".equals(state);
    }

    /** The last seq written for {@code run}, 0 when none. */
    public synchronized long lastSeq(String run) {
        return lastSeq.getOrDefault(run, 0L);
    }

    /** How many stream events the file already held for {@code run} when it was opened. */
    public synchronized long streamEventsHeld(String run) {
        return streamHeld.getOrDefault(run, 0L);
    }

    /**
     * Forgets the stream events held for {@code run}: the log it was read from is not the same file any more
     * (replaced by a new run), so what is re-read is new and must be written.
     */
    public synchronized void forgetHeld(String run) {
        streamHeld.remove(run);
    }

    /** True while {@code run} is still re-producing stream events that the file already holds. */
    public synchronized boolean replaying(String run) {
        return streamSeen.getOrDefault(run, 0L) < streamHeld.getOrDefault(run, 0L);
    }

    /**
     * Writes one event, or skips it when it is a stream event the file already holds (resume). Returns the
     * event as written, or null when skipped. Never throws for an I/O failure of the timeline file: it is
     * reported as {@link UncheckedIOException} only when the file cannot be written at all.
     */
    @Override
    public synchronized TimelineEvent append(PendingEvent e) {
        if (closed) {
            return null;
        }
        if (isStream(e.type(), e.state(), e.pattern())) {
            long seen = streamSeen.merge(e.run(), 1L, Long::sum);
            if (seen <= streamHeld.getOrDefault(e.run(), 0L)) {
                return null;
            }
        }
        long seq = lastSeq.merge(e.run(), 1L, Long::sum);
        Instant at = clock.instant().truncatedTo(ChronoUnit.MILLIS);
        TimelineEvent ev = TimelineEvent.of(seq, at, e);
        byte[] bytes = encode(ev);
        try {
            ByteBuffer buf = ByteBuffer.wrap(bytes);
            long pos = channel.size();
            while (buf.hasRemaining()) {
                pos += channel.write(buf, pos);
            }
            if (forceEach) {
                channel.force(false);
            }
        } catch (IOException ex) {
            throw new UncheckedIOException("cannot write the timeline " + file, ex);
        }
        echo.accept(ev);
        for (Consumer<TimelineEvent> l : listeners) {
            try {
                l.accept(ev);
            } catch (RuntimeException ex) {
                // a listener's failure (live view) never stops the journal
            }
        }
        return ev;
    }

    /** The JSON line of an event (with its newline), keys in the contract's order. */
    public static byte[] encode(TimelineEvent ev) {
        Map<String, Object> m = toMap(ev);
        try {
            ByteArrayOutputStream out = new ByteArrayOutputStream(256);
            JSON.writeValue(out, m);
            out.write('\n');
            return out.toByteArray();
        } catch (IOException ex) {
            throw new UncheckedIOException(ex);
        }
    }

    /** The event as an ordered map, as written. */
    public static Map<String, Object> toMap(TimelineEvent ev) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("seq", ev.seq());
        m.put("run", ev.run());
        m.put("type", ev.type().id());
        m.put("at", AT.format(ev.at()));
        m.put("iter", ev.iter());
        m.put("state", ev.state());
        m.put("severity", (ev.severity() == null ? Severity.INFO : ev.severity()).id());
        for (Map.Entry<String, Object> f : ev.fields().entrySet()) {
            m.put(f.getKey(), sanitize(f.getValue()));
        }
        return m;
    }

    /** JSON has no NaN or infinity: such numbers are written as the strings the contract allows. */
    private static Object sanitize(Object v) {
        if (v instanceof Double d && (d.isNaN() || d.isInfinite())) {
            return d.isNaN() ? "NaN" : d > 0 ? "Infinity" : "-Infinity";
        }
        if (v instanceof Float f && (f.isNaN() || f.isInfinite())) {
            return sanitize(f.doubleValue());
        }
        if (v instanceof Map<?, ?> map) {
            Map<Object, Object> out = new LinkedHashMap<>();
            map.forEach((k, x) -> out.put(k, sanitize(x)));
            return out;
        }
        if (v instanceof List<?> list) {
            List<Object> out = new ArrayList<>(list.size());
            for (Object x : list) {
                out.add(sanitize(x));
            }
            return out;
        }
        return v;
    }

    @Override
    public synchronized void close() throws IOException {
        if (!closed) {
            closed = true;
            channel.force(true);
            channel.close();
        }
    }
}
