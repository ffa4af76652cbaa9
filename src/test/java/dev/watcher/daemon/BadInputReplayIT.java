package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.cli.Main;
import java.io.ByteArrayOutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Bad input through the whole pipeline: each kind is counted per run and skipped, the good records around
 * it are all used, and nothing stops the run (issue "Bad input, nothing lost").
 */
class BadInputReplayIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static void line(ByteArrayOutputStream out, String s) {
        out.writeBytes((s + "\n").getBytes(StandardCharsets.UTF_8));
    }

    @Test
    void everyKindOfBadInputIsCountedAndSkippedAndTheGoodRecordsAllCount(@TempDir Path dir) throws Exception {
        ByteArrayOutputStream b = new ByteArrayOutputStream();
        int good = 0;
        for (int i = 1; i <= 50; i++) {
            line(b, "{\"iter\": " + i + ", \"residuals\": {\"cont\": " + Math.pow(10, -i / 10.0) + "}}");
            good++;
        }
        b.writeBytes(new byte[] {0, 1, 2, (byte) 0xff, 0, 3, '\n'});              // binary garbage
        line(b, "{\"iter\": 51, \"residuals\": {\"cont\": 1.2.3e-4}}");          // a value that is not a number
        line(b, "{\"residuals\": {\"cont\": 1e-3}}");                             // the iteration is missing
        b.writeBytes(new byte[] {'{', '"', (byte) 0xe2, (byte) 0x82, '\n'});      // truncated UTF-8
        b.writeBytes("x".repeat(10 * 1024 * 1024).getBytes(StandardCharsets.US_ASCII)); // a 10 MB line
        b.write('\n');
        for (int i = 52; i <= 60; i++) {
            line(b, "{\"iter\": " + i + ", \"residuals\": {\"cont\": " + Math.pow(10, -i / 10.0) + "}}");
            good++;
        }
        Path log = dir.resolve("garbled.jsonl");
        Files.write(log, b.toByteArray());
        assertEquals(0, Main.execute("replay", log.toString(), "--state", dir.resolve("s").toString(), "-q"));
        JsonNode run = JSON.readTree(dir.resolve("s/runs/garbled.json").toFile());
        JsonNode c = run.get("counters");
        assertEquals(good, c.get("records").asLong(), c.toString());
        JsonNode bad = c.get("malformed");
        assertTrue(bad.path("binary").asLong() + bad.path("bad-utf8").asLong() >= 2, bad.toString());
        assertTrue(bad.path("too-long").asLong() >= 1, bad.toString());
        assertTrue(bad.path("bad-number").asLong() + bad.path("bad-shape").asLong() >= 1, bad.toString());
        assertTrue(bad.path("missing-field").asLong() >= 1, bad.toString());
        assertEquals(60, run.get("last_iter").asLong());
    }

    @Test
    void anEmptyLogGivesAStartedAndAnEndedRunAndNothingElse(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("empty.jsonl");
        Files.writeString(log, "");
        assertEquals(0, Main.execute("replay", log.toString(), "--state", dir.resolve("s").toString(), "-q"));
        assertEquals(2, Files.readAllLines(dir.resolve("s/timeline.jsonl")).size());
    }
}
