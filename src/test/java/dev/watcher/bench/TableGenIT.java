package dev.watcher.bench;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.tail.LogReader;
import dev.watcher.tail.TailOptions;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class TableGenIT {

    @TempDir
    Path dir;

    @Test
    void handWrittenNumbersAreWhatTheJdkFormatterPrintsForThem() {
        // reference: java.util.Formatter's %.4e; each printed text, parsed back and formatted again, is unchanged
        SplittableRandom rnd = new SplittableRandom(3);
        byte[] b = new byte[32];
        for (int k = 0; k < 20_000; k++) {
            double log10 = rnd.nextDouble(-120, 120);
            double v = Math.pow(10, log10) * (rnd.nextBoolean() ? 1 : -1);
            int n = TableGen.putSci(b, 0, v);
            String text = new String(b, 0, n, StandardCharsets.US_ASCII);
            assertEquals(String.format(Locale.ROOT, "%.4e", Double.parseDouble(text)), text);
            assertEquals(v, Double.parseDouble(text), Math.abs(v) * 1e-4, text);
        }
        int n = TableGen.putSci(b, 0, 0.0);
        assertEquals(String.format(Locale.ROOT, "%.4e", 0.0), new String(b, 0, n, StandardCharsets.US_ASCII));
    }

    @Test
    void writesAHeaderAndNineColumnsOfPositiveNumbersThatDecay() throws IOException {
        Path f = dir.resolve("t.txt");
        int lines = 5000;
        long bytes = TableGen.write(f, lines);
        assertEquals(Files.size(f), bytes);
        List<String> all = Files.readAllLines(f, StandardCharsets.US_ASCII);
        assertEquals(lines + 1, all.size());
        assertEquals(List.of("#", "pass", "cont", "mom-x", "mom-y", "temp", "k", "omega", "vof", "vmid"),
                List.of(all.get(0).trim().split("\\s+")));
        double early = 0;
        double late = 0;
        for (int i = 1; i <= lines; i++) {
            String[] c = all.get(i).trim().split("\\s+");
            assertEquals(9, c.length, all.get(i));
            assertEquals(Long.toString(i), c[0]);
            for (int j = 1; j < 9; j++) {
                double v = Double.parseDouble(c[j]);
                assertTrue(v > 0, all.get(i));
                assertEquals(String.format(Locale.ROOT, "%.4e", v), c[j]);
            }
            if (i <= 500) {
                early += Math.log10(Double.parseDouble(c[1]));
            } else if (i > lines - 500) {
                late += Math.log10(Double.parseDouble(c[1]));
            }
        }
        assertTrue((early - late) / 500 > 3, "continuity falls by more than three decades over the run");
    }

    @Test
    void sameLineCountGivesTheSameBytes() throws IOException {
        Path a = dir.resolve("a.txt");
        Path b = dir.resolve("b.txt");
        TableGen.write(a, 2000);
        TableGen.write(b, 2000);
        assertArrayEquals(Files.readAllBytes(a), Files.readAllBytes(b));
    }

    @Test
    void benchSinkParsesEveryRecordAndSumsLikeADirectParse() throws IOException {
        Path f = dir.resolve("s.txt");
        TableGen.write(f, 3000);
        ReadBench.TableSink sink = new ReadBench.TableSink();
        long n = LogReader.readAll(f, sink, TailOptions.DEFAULTS);
        assertEquals(3001, n);
        assertEquals(3000, sink.records);
        assertEquals(1, sink.comments);
        assertEquals(0, sink.malformed);
        assertEquals(3000, sink.lastIter);
        // reference: Double.parseDouble over String.split of the same file
        double expected = 0;
        for (String line : Files.readAllLines(f)) {
            if (line.startsWith("#")) {
                continue;
            }
            String[] c = line.trim().split("\\s+");
            double sum = 0;
            for (int j = 1; j < 9; j++) {
                sum += Math.log(Double.parseDouble(c[j]));
            }
            expected += sum;
        }
        assertEquals(expected, sink.sumLog, Math.abs(expected) * 1e-12);
    }

    @Test
    void benchSinkGivesTheSameResultForAStringAndForAByteView() throws IOException {
        Path f = dir.resolve("v.txt");
        TableGen.write(f, 200);
        ReadBench.TableSink bytes = new ReadBench.TableSink();
        LogReader.readAll(f, bytes, TailOptions.DEFAULTS);
        ReadBench.TableSink strings = new ReadBench.TableSink();
        long no = 0;
        for (String line : Files.readAllLines(f)) {
            strings.line(line, ++no);
        }
        strings.line("  7 1.0e-01 2.0e-01 x 1 1 1 1 1", ++no);
        assertEquals(bytes.records, strings.records);
        assertEquals(bytes.sumLog, strings.sumLog, 0.0);
        assertEquals(1, strings.malformed);
    }
}
