package dev.watcher.journal;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class JournalIT {

    private static final Clock CLOCK = Clock.fixed(Instant.parse("2026-12-01T02:13:07.123456Z"), ZoneOffset.UTC);
    private static final ObjectMapper JSON = new ObjectMapper();

    private static PendingEvent det(String run, long iter, String pattern) {
        return PendingEvent.detection(run, new Detection(pattern, DetectionState.OPEN, Severity.CRITICAL, iter,
                List.of("energy"), null, "energy residual rising", "look for a mesh trouble spot",
                Map.of("slope_decades_per_iter", 0.08, "last", Double.NaN)));
    }

    @Test
    void writesOneContractLinePerEventWithUtcMillisecondsAndSeqFromOne(@TempDir Path dir) throws Exception {
        Path f = dir.resolve("timeline.jsonl");
        try (Journal j = Journal.open(f, CLOCK, null, false)) {
            j.append(PendingEvent.run("cavity", 0, "started", "watching"));
            j.append(det("cavity", 5120, "single-equation-blowup"));
        }
        List<String> lines = Files.readAllLines(f);
        assertEquals(2, lines.size());
        JsonNode n = JSON.readTree(lines.get(1));
        assertEquals(2, n.get("seq").asLong());
        assertEquals("cavity", n.get("run").asText());
        assertEquals("detection", n.get("type").asText());
        assertEquals("2026-12-01T02:13:07.123Z", n.get("at").asText());
        assertEquals(5120, n.get("iter").asLong());
        assertEquals("single-equation-blowup", n.get("pattern").asText());
        assertEquals("open", n.get("state").asText());
        assertEquals("critical", n.get("severity").asText());
        assertTrue(n.get("monitor").isNull());
        // JSON has no NaN: the contract's string form is written instead
        assertEquals("NaN", n.get("evidence").get("last").asText());
    }

    @Test
    void resumeSkipsTheStreamEventsAlreadyWrittenAndContinuesSeq(@TempDir Path dir) throws Exception {
        Path f = dir.resolve("timeline.jsonl");
        try (Journal j = Journal.open(f, CLOCK, null, false)) {
            j.append(PendingEvent.run("a", 0, "started", "x"));
            j.append(det("a", 10, "residual-level"));
            j.append(det("a", 20, "residual-level"));
            j.append(PendingEvent.run("a", 20, "ended", "killed"));
        }
        List<TimelineEvent> written = new ArrayList<>();
        try (Journal j = Journal.open(f, CLOCK, written::add, false)) {
            assertEquals(4, j.lastSeq("a"));
            assertEquals(2, j.streamEventsHeld("a"));
            j.append(PendingEvent.run("a", 0, "resumed", "x"));
            assertNull(j.append(det("a", 10, "residual-level")), "already in the timeline");
            assertNull(j.append(det("a", 20, "residual-level")), "already in the timeline");
            j.append(det("a", 30, "residual-level"));
        }
        assertEquals(List.of(5L, 6L), written.stream().map(TimelineEvent::seq).toList());
        assertEquals(30, written.get(1).iter());
    }

    @Test
    void aReplayTimelineForcedOnlyAtCloseStillShowsEachEventToReadersAsItIsAppended(@TempDir Path dir)
            throws Exception {
        Path f = dir.resolve("timeline.jsonl");
        try (Journal j = Journal.open(f, CLOCK, null, true, false)) {
            j.append(PendingEvent.run("a", 0, "started", "replay"));
            assertEquals(1, Files.readAllLines(f).size(), "written before append returns");
            j.append(det("a", 10, "residual-level"));
            List<String> lines = Files.readAllLines(f);
            assertEquals(2, lines.size());
            assertEquals(2, JSON.readTree(lines.get(1)).get("seq").asLong());
        }
        // and a journal opened on it afterwards learns it like any other
        try (Journal j = Journal.open(f, CLOCK, null, false)) {
            assertEquals(2, j.lastSeq("a"));
            assertEquals(1, j.streamEventsHeld("a"));
        }
    }

    @Test
    void aHalfWrittenLastLineIsDroppedOnOpen(@TempDir Path dir) throws Exception {
        Path f = dir.resolve("timeline.jsonl");
        try (Journal j = Journal.open(f, CLOCK, null, false)) {
            j.append(det("a", 10, "residual-level"));
        }
        Files.write(f, "{\"seq\": 2, \"run\": \"a\", \"ty".getBytes(StandardCharsets.UTF_8), StandardOpenOption.APPEND);
        try (Journal j = Journal.open(f, CLOCK, null, false)) {
            assertEquals(1, j.lastSeq("a"));
            j.append(PendingEvent.run("a", 20, "resumed", "after a crash"));
        }
        List<String> lines = Files.readAllLines(f);
        assertEquals(2, lines.size());
        assertEquals(2, JSON.readTree(lines.get(1)).get("seq").asLong());
    }

    @Test
    void aSecondDaemonOnTheSameStateDirectoryIsRefused(@TempDir Path dir) throws Exception {
        try (StateDir first = StateDir.open(dir, false)) {
            StateDir.LockedException e = assertThrows(StateDir.LockedException.class, () -> StateDir.open(dir, false));
            assertTrue(e.getMessage().contains("in use by another watcher"), e.getMessage());
            first.saveRun("a/b", Map.of("last_seq", 3));
            assertEquals(3, first.loadRun("a/b").get("last_seq"));
        }
    }
}
