package dev.watcher.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.journal.StateDir;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The command line's outside contract: exit codes and messages that name file, line and what was expected. */
class CliIT {

    private final ByteArrayOutputStream err = new ByteArrayOutputStream();
    private final ByteArrayOutputStream out = new ByteArrayOutputStream();
    private PrintStream oldErr;
    private PrintStream oldOut;

    @BeforeEach
    void capture() {
        oldErr = System.err;
        oldOut = System.out;
        System.setErr(new PrintStream(err, true, StandardCharsets.UTF_8));
        System.setOut(new PrintStream(out, true, StandardCharsets.UTF_8));
    }

    @AfterEach
    void restore() {
        System.setErr(oldErr);
        System.setOut(oldOut);
    }

    private String err() {
        return err.toString(StandardCharsets.UTF_8);
    }

    @Test
    void checkAcceptsTheShippedRulesAndFormats() throws Exception {
        Path root = Path.of("").toAbsolutePath();
        int rc = Main.execute("check", root.resolve("rules/default.yaml").toString());
        assertEquals(0, rc, err());
        try (var s = Files.list(root.resolve("test-logs/formats"))) {
            for (Path f : s.filter(p -> p.toString().endsWith(".yaml")).toList()) {
                assertEquals(0, Main.execute("check", f.toString()), f + ": " + err());
            }
        }
    }

    @Test
    void checkNamesFileLineAndWhatWasExpected(@TempDir Path dir) throws Exception {
        Path bad = dir.resolve("bad-rules.yaml");
        Files.writeString(bad, "kind: rules\npatterns:\n  no-such-pattern:\n    severity: warning\n");
        int rc = Main.execute("check", bad.toString());
        assertEquals(2, rc);
        assertTrue(err().contains(bad.toString() + ":3:"), err());
        Path noKind = dir.resolve("nokind.yaml");
        Files.writeString(noKind, "layout: table\n");
        assertEquals(2, Main.execute("check", noKind.toString()));
        assertTrue(err().contains(noKind + ":1:1:"), err());
    }

    @Test
    void replayOfAMissingLogIsBadUsage(@TempDir Path dir) {
        int rc = Main.execute("replay", dir.resolve("none.log").toString());
        assertEquals(2, rc);
        assertTrue(err().contains("none.log"), err());
    }

    @Test
    void aSecondDaemonOnALockedStateDirectoryExitsTwo(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("fan.jsonl");
        Files.writeString(log, "{\"iter\": 1, \"residuals\": {\"cont\": 1.0}}\n");
        Path state = dir.resolve("state");
        try (StateDir held = StateDir.open(state, false)) {
            int rc = Main.execute("watch", log.toString(), "--state", state.toString(), "-q");
            assertEquals(2, rc);
            assertTrue(err().contains("in use by another watcher"), err());
        }
    }

    @Test
    void anUnknownJobFormIsBadUsage(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("fan.jsonl");
        Files.writeString(log, "");
        int rc = Main.execute("watch", log.toString(), "--job", "lsf:12", "-q", "--state", dir.resolve("s").toString());
        assertEquals(2, rc);
        assertTrue(err().contains("pid:N"), err());
    }

    @Test
    void everyCommandHasHelp() {
        for (String c : new String[] {"watch", "replay", "check", "bench"}) {
            assertEquals(0, Main.execute(c, "--help"), c);
        }
        assertTrue(out.toString(StandardCharsets.UTF_8).contains("--from-end"));
    }
}
