package dev.watcher.live;

import java.net.URLDecoder;
import java.net.URLEncoder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;

/**
 * The last timeline events pushed on the event stream, held so that a page that connects after taking its
 * snapshot, or reconnects after a lost connection, receives what it has not seen before the stream goes live.
 * Bounded: the oldest event goes when {@code capacity} are held (across all runs).
 *
 * <p>Positions. Each streamed timeline event carries {@code RUN:SEQ} as its event-stream {@code id} (the run's
 * name URL-encoded, so the id has no colon, comma or line break of its own; {@code seq} is the run's timeline
 * sequence number). A client names what it has seen in two ways, both optional:
 * <ul>
 * <li>{@code Last-Event-ID} (sent by a browser's {@code EventSource} when it reconnects): the id of the last
 * event it received. When that event is still held, everything held after it is replayed, whatever the run.</li>
 * <li>{@code after=RUN:SEQ,RUN:SEQ...} (query parameter; the page sends the highest seq of each run in the
 * snapshot it loaded): per run, events with a higher seq are replayed; events of runs not named are replayed
 * whole (the page loads such a run when it first hears of it and drops what it already has).</li>
 * </ul>
 * A {@code Last-Event-ID} that is no longer held (evicted, or from before a restart of the daemon) counts as
 * one more {@code RUN:SEQ} of the {@code after} kind. A client that names neither gets the live stream only.
 * Replayed events may repeat what the client has (its snapshot and the backlog overlap); the page drops a
 * repeat by its seq.
 *
 * <p>Not thread-safe: the {@link LiveServer} guards it with the lock under which it also lists new clients
 * and pushes new events, so an event is either replayed to a connecting client or pushed to it, never neither.
 */
final class StreamBacklog {

    /** One streamed timeline event: its run, its seq and the chunk of the event stream that carries it. */
    record Entry(String run, long seq, String chunk) {
    }

    private final int capacity;
    private final ArrayDeque<Entry> held;

    StreamBacklog(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity must be positive: " + capacity);
        }
        this.capacity = capacity;
        this.held = new ArrayDeque<>(Math.min(capacity, 1024));
    }

    /** The event-stream id of a run's event: {@code RUN:SEQ}, the run URL-encoded. */
    static String id(String run, long seq) {
        return URLEncoder.encode(run, StandardCharsets.UTF_8) + ":" + seq;
    }

    /** Holds one more event, dropping the oldest beyond the capacity. */
    void add(Entry e) {
        held.addLast(e);
        while (held.size() > capacity) {
            held.removeFirst();
        }
    }

    int size() {
        return held.size();
    }

    /**
     * The chunks to replay to a client, oldest first.
     *
     * @param lastEventId the {@code Last-Event-ID} header, or null
     * @param after       the {@code after} query parameter, or null
     */
    List<String> replay(String lastEventId, String after) {
        Map<String, Long> seen = parseAfter(after);
        Position last = parse(lastEventId);
        List<String> out = new ArrayList<>();
        if (last != null) {
            boolean found = false;
            for (Iterator<Entry> it = held.iterator(); it.hasNext();) {
                Entry e = it.next();
                if (found) {
                    out.add(e.chunk());
                } else if (e.seq() == last.seq() && e.run().equals(last.run())) {
                    found = true;
                }
            }
            if (found) {
                return out;
            }
            seen.merge(last.run(), last.seq(), Math::max);
        }
        if (seen.isEmpty()) {
            return out;
        }
        for (Entry e : held) {
            Long s = seen.get(e.run());
            if (s == null || e.seq() > s) {
                out.add(e.chunk());
            }
        }
        return out;
    }

    private record Position(String run, long seq) {
    }

    /** {@code RUN:SEQ}, or null when {@code text} is not one. */
    private static Position parse(String text) {
        if (text == null) {
            return null;
        }
        int colon = text.lastIndexOf(':');
        if (colon <= 0 || colon == text.length() - 1) {
            return null;
        }
        try {
            long seq = Long.parseLong(text.substring(colon + 1).trim());
            return new Position(URLDecoder.decode(text.substring(0, colon).trim(), StandardCharsets.UTF_8), seq);
        } catch (IllegalArgumentException e) {
            // NumberFormatException, or a malformed %-escape in the run: not a position of ours
            return null;
        }
    }

    private static Map<String, Long> parseAfter(String after) {
        Map<String, Long> out = new HashMap<>();
        if (after == null || after.isBlank()) {
            return out;
        }
        for (String part : after.split(",")) {
            Position p = parse(part);
            if (p != null) {
                out.merge(p.run(), p.seq(), Math::max);
            }
        }
        return out;
    }
}
