package dev.watcher.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.parse.Formats;
import dev.watcher.rules.RulesLoader;
import java.io.OutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code --from-end} skips the log's history: only lines written after the start are read. */
class FromEndIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static String rec(int i) {
        return "{\"iter\": " + i + ", \"residuals\": {\"cont\": " + Math.pow(10, -i / 20.0) + "}}\n";
    }

    @Test
    void fromEndReadsOnlyWhatIsWrittenAfterTheStart(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("basin.jsonl");
        StringBuilder history = new StringBuilder();
        for (int i = 1; i <= 50; i++) {
            history.append(rec(i));
        }
        Files.writeString(log, history);
        Path state = dir.resolve("state");
        DaemonConfig c = new DaemonConfig(
                List.of(new RunSpec("basin", List.of(log), List.of(Formats.builtIn("jsonl")))),
                RulesLoader.defaults(), Map.of(), List.of(), state, null, true, Map.of(), false, null, null, null,
                false, Duration.ofMillis(50), Duration.ofMillis(200), Duration.ofMinutes(5), Duration.ofSeconds(2),
                new PrintStream(OutputStream.nullOutputStream()), true, null);
        Daemon d = new Daemon(c);
        Thread t = new Thread(() -> {
            try {
                d.run();
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        });
        t.start();
        try {
            Path tl = state.resolve("timeline.jsonl");
            await().atMost(Duration.ofSeconds(20)).until(() -> Files.exists(tl)
                    && Files.readString(tl).contains("caught-up"));
            for (int i = 51; i <= 55; i++) {
                Files.writeString(log, rec(i), StandardOpenOption.APPEND);
            }
            Path rs = state.resolve("runs/basin.json");
            await().atMost(Duration.ofSeconds(20)).until(() -> Files.exists(rs)
                    && JSON.readTree(rs.toFile()).path("last_iter").asLong() == 55);
            JsonNode counters = JSON.readTree(rs.toFile()).get("counters");
            assertEquals(5, counters.get("records").asLong(), counters.toString());
        } finally {
            d.shutdown("test over");
            t.join(30_000);
        }
        assertTrue(!t.isAlive());
    }
}
