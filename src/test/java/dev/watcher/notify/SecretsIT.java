package dev.watcher.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.SecretRef;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class SecretsIT {

    @TempDir
    Path dir;

    @Test
    void readsAFileWithoutItsTrailingNewline() throws Exception {
        Path f = dir.resolve("hook.secret");
        Files.writeString(f, "whsec_c2VjcmV0\n");
        assertEquals("whsec_c2VjcmV0", Secrets.resolve(SecretRef.ofFile(f.toString())));
    }

    @Test
    void readsAnEnvironmentVariable() {
        assertEquals("tok", Secrets.resolve(SecretRef.ofEnv("HOOK_URL"), Secrets.env(Map.of("HOOK_URL", "tok"))));
    }

    @Test
    void errorsSayWhereButNeverWhat() throws Exception {
        IllegalArgumentException missing = assertThrows(IllegalArgumentException.class,
                () -> Secrets.resolve(SecretRef.ofEnv("NOPE"), Secrets.env(Map.of())));
        assertTrue(missing.getMessage().contains("environment variable NOPE"));
        Path empty = dir.resolve("empty");
        Files.writeString(empty, "  \n");
        IllegalArgumentException blank = assertThrows(IllegalArgumentException.class,
                () -> Secrets.resolve(SecretRef.ofFile(empty.toString())));
        assertTrue(blank.getMessage().contains("empty"));
        IllegalArgumentException absent = assertThrows(IllegalArgumentException.class,
                () -> Secrets.resolve(SecretRef.ofFile(dir.resolve("none").toString())));
        assertFalse(absent.getMessage().isEmpty());
        assertNull(Secrets.resolve(null));
    }
}
