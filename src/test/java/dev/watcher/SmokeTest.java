package dev.watcher;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.watcher.model.Samples;
import java.util.LinkedHashMap;
import java.util.Map;
import org.junit.jupiter.api.Test;

class SmokeTest {
    @Test
    void samplesKeepTheLogsOrder() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("z", 1.0);
        m.put("a", 2.0);
        assertEquals("z", Samples.of(m).name(0));
    }
}
