package dev.watcher.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Notice;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class OutboxIT {

    @TempDir
    Path dir;

    @Test
    void pendingNoticeSurvivesReopeningWithAllItsFields() throws Exception {
        Notice n = Notices.blowup("n-1", "ops");
        new Outbox(dir, 10).put(n);
        List<Notice> loaded = new Outbox(dir, 10).load();
        assertEquals(List.of(n), loaded);
    }

    @Test
    void completedIdIsRememberedAcrossReopeningAndItsFileIsGone() throws Exception {
        Outbox box = new Outbox(dir, 10);
        box.put(Notices.blowup("n-1", "ops"));
        box.put(Notices.blowup("n-2", "ops"));
        box.complete("n-1");
        assertFalse(box.holds("n-1"));
        Outbox again = new Outbox(dir, 10);
        assertTrue(again.isDone("n-1"));
        assertFalse(again.isDone("n-2"));
        assertEquals(List.of("n-2"), again.load().stream().map(Notice::id).toList());
    }

    @Test
    void fileLeftBehindByACrashAfterRecordingDoneIsNotResumed() throws Exception {
        Outbox box = new Outbox(dir, 10);
        Notice n = Notices.blowup("n-1", "ops");
        box.put(n);
        box.complete("n-1");
        // as if the daemon died between recording the id and removing the file
        new Outbox(dir, 10).put(n);
        Outbox after = new Outbox(dir, 10);
        assertTrue(after.load().isEmpty());
        assertFalse(after.holds("n-1"));
    }

    @Test
    void keepsOnlyTheMostRecentDoneIds() throws Exception {
        Outbox box = new Outbox(dir, 3);
        for (int i = 1; i <= 10; i++) {
            box.complete("n-" + i);
        }
        Outbox again = new Outbox(dir, 3);
        assertFalse(again.isDone("n-7"));
        assertTrue(again.isDone("n-8") && again.isDone("n-9") && again.isDone("n-10"));
        assertTrue(Files.readAllLines(dir.resolve(Outbox.DONE_FILE)).size() <= 6);
    }

    @Test
    void unreadableFileIsSetAsideNotFatal() throws Exception {
        Outbox box = new Outbox(dir, 10);
        box.put(Notices.blowup("n-1", "ops"));
        Files.writeString(dir.resolve("0000" + Outbox.SUFFIX), "{ not json");
        List<Notice> loaded = new Outbox(dir, 10).load();
        assertEquals(List.of("n-1"), loaded.stream().map(Notice::id).toList());
        assertTrue(Files.exists(dir.resolve("0000" + Outbox.SUFFIX + ".bad")));
    }

    @Test
    void idsWithLineBreaksSurviveTheDoneList() throws Exception {
        new Outbox(dir, 10).complete("odd\nid\\x");
        assertTrue(new Outbox(dir, 10).isDone("odd\nid\\x"));
    }
}
