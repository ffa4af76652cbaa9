package dev.watcher.tail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class LogReaderIT {

    @TempDir
    Path dir;

    @Test
    void readsEveryLineOfAFinishedFileIncludingAnUnterminatedLastOne() throws IOException {
        Path f = dir.resolve("done.log");
        Files.write(f, "a\r\nb\rc\n\nlast".getBytes(StandardCharsets.US_ASCII));
        RecordingHandler h = new RecordingHandler();
        assertEquals(5, LogReader.readAll(f, h, TailOptions.DEFAULTS));
        assertEquals(List.of("a", "b", "c", "", "last"), h.lines);
        assertEquals(List.of(1L, 2L, 3L, 4L, 5L), h.numbers);
    }

    @Test
    void matchesTheJdkLineReaderOnAFileLargerThanItsBuffer() throws IOException {
        // reference: java.io.BufferedReader.readLine, which also ends lines at \n, \r\n and a bare \r
        Path f = dir.resolve("mixed.log");
        try (OutputStream out = Files.newOutputStream(f)) {
            for (int i = 0; i < 120_000; i++) {
                String end = i % 7 == 0 ? "\r\n" : i % 11 == 0 ? "\r" : "\n";
                String text = i % 13 == 0 ? "  sweep " + i + " t\u00e9mp\u00e9rature " : "   " + i + " 1.2345e-0" + (i % 10);
                out.write((text + end).getBytes(StandardCharsets.UTF_8));
            }
        }
        List<String> expected = new ArrayList<>();
        try (var r = Files.newBufferedReader(f, StandardCharsets.UTF_8)) {
            for (String s; (s = r.readLine()) != null; ) {
                expected.add(s);
            }
        }
        RecordingHandler h = new RecordingHandler();
        assertEquals(expected.size(), LogReader.readAll(f, h, TailOptions.DEFAULTS));
        assertEquals(expected, h.lines);
        assertEquals(List.of(), h.notices);
    }

    @Test
    void countsBadInputAndGoesOn() throws IOException {
        Path f = dir.resolve("bad.log");
        try (OutputStream out = Files.newOutputStream(f)) {
            out.write("ok\n".getBytes(StandardCharsets.US_ASCII));
            out.write(new byte[] {0, 0, 0, '\n'});
            out.write("y".repeat(100).getBytes(StandardCharsets.US_ASCII));
            out.write('\n');
            out.write(new byte[] {'z', (byte) 0xc3, '\n'});
        }
        RecordingHandler h = new RecordingHandler();
        assertEquals(3, LogReader.readAll(f, h, TailOptions.DEFAULTS.withMaxLineBytes(40)));
        assertEquals(List.of("ok", "y".repeat(40), "z\ufffd"), h.lines);
        assertEquals(List.of(TailNotice.Kind.BINARY, TailNotice.Kind.LINE_CUT, TailNotice.Kind.BAD_UTF8), h.kinds());
        assertEquals(List.of(2L, 3L, 4L), h.notices.stream().map(TailNotice::lineNo).toList());
    }

    @Test
    void anEmptyFileHasNoLines() throws IOException {
        Path f = dir.resolve("empty.log");
        Files.createFile(f);
        RecordingHandler h = new RecordingHandler();
        assertEquals(0, LogReader.readAll(f, h, TailOptions.DEFAULTS));
        assertEquals(List.of(), h.events);
    }

    @Test
    void aMissingFileIsAnIoErrorNamingIt() {
        Path f = dir.resolve("nope.log");
        NoSuchFileException e = assertThrows(NoSuchFileException.class,
                () -> LogReader.readAll(f, new RecordingHandler(), TailOptions.DEFAULTS));
        assertEquals(f.toString(), e.getFile());
    }
}
