package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.watcher.model.AsciiText;
import java.nio.charset.StandardCharsets;
import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Reading a number from the bytes of an ASCII line gives what reading it from the characters gives, bit for
 * bit, and both equal the JDK's Double.parseDouble (the reference) for the shapes Java also reads.
 */
class NumbersAsciiTest {

    private record Bytes(byte[] array, int offset, int length) implements AsciiText {
        @Override
        public char charAt(int index) {
            return (char) array[offset + index];
        }

        @Override
        public CharSequence subSequence(int start, int end) {
            return new String(array, offset + start, end - start, StandardCharsets.US_ASCII);
        }

        @Override
        public String toString() {
            return subSequence(0, length).toString();
        }
    }

    private static void same(String token, String tail) {
        String line = "  " + token + tail;
        byte[] raw = ("xyz" + line).getBytes(StandardCharsets.US_ASCII);
        Bytes t = new Bytes(raw, 3, line.length());
        int[] e1 = new int[1];
        int[] e2 = new int[1];
        double a = Numbers.scanAscii(t, 2, line.length(), e1);
        double c = Numbers.scan(line, 2, line.length(), e2);
        assertEquals(Double.doubleToRawLongBits(c), Double.doubleToRawLongBits(a), token);
        assertEquals(e2[0], e1[0], "end of " + token);
        if (!Numbers.isMalformed(c) && token.matches("[-+]?[0-9.]+([eE][-+]?[0-9]+)?")) {
            assertEquals(Double.doubleToRawLongBits(Double.parseDouble(token)), Double.doubleToRawLongBits(a), token);
        }
    }

    @Test
    void theFixedShapeOfFourDecimalsAndEveryOtherShapeReadAsFromCharacters() {
        SplittableRandom rnd = new SplittableRandom(11);
        String[] tails = {"", " ", "\t1.0", "\r", " 2.5e-03"};
        for (int i = 0; i < 20000; i++) {
            double v = Math.pow(10, rnd.nextDouble(-40, 40)) * (rnd.nextBoolean() ? 1 : -1);
            same(String.format(Locale.ROOT, "%.4e", v), tails[rnd.nextInt(tails.length)]);
            same(String.format(Locale.ROOT, "%.4E", v), tails[rnd.nextInt(tails.length)]);
        }
        String[] odd = {"0.0000e+00", "-0.0000e+00", "1.0000e+99", "9.9999e-99", "1.2345e+22", "1.2345e-19",
            "+1.2345e-03", "1.2345e-3", "1.2345e-003", "1.2345d-03", "1.2345e-03x", "1.2.45e-03", "1.234-105",
            "1.23456e-03", "12.345e-03", "1.2345e+0", "nan", "-inf", "*******", "1.#QNAN", "7", "-12"};
        for (String s : odd) {
            for (String tail : tails) {
                same(s, tail);
            }
        }
    }
}
