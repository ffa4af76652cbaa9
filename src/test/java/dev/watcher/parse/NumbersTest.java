package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Reference for ordinary numbers: the JDK's {@link Double#parseDouble} (correctly rounded per the Java
 * Language Specification and IEEE 754). Fortran forms: ISO/IEC 1539-1 (Fortran 2018), E and D editing,
 * where an exponent beyond two digits is printed without its letter ({@code 1.234-105}) [memory]. The
 * {@code 1.#QNAN}, {@code 1.#IND}, {@code 1.#INF} spellings: the output of Microsoft's C runtime printf
 * before Visual Studio 2015 [memory]. Overflow asterisks: Fortran fills a field with asterisks when a value
 * does not fit its width (ISO/IEC 1539-1, 13.7.2.1) [memory].
 */
class NumbersTest {

    private static double p(String s) {
        return Numbers.parse(s, 0, s.length());
    }

    @Test
    void readsOrdinaryDecimalsExactlyAsTheJdkDoes() {
        for (String s : new String[] {"3.2e-02", "1.0000e+00", "0", "-0.5", "12", ".5", "5.", "+7.25E3",
            "123456789012345678901234", "1e-320", "1.7976931348623157e308", "2.2250738585072014E-308",
            "0.1", "9007199254740993", "1.0000e-25", "4.9406564584124654e-324"}) {
            assertEquals(Double.parseDouble(s), p(s), s);
        }
    }

    @Test
    void agreesWithTheJdkOnRandomValuesPrintedTheWaySolversPrintThem() {
        SplittableRandom rnd = new SplittableRandom(20261202);
        for (int i = 0; i < 40_000; i++) {
            double v = Math.pow(10, rnd.nextDouble(-40, 40)) * (rnd.nextBoolean() ? 1 : -1);
            String fmt = switch (i % 4) {
                case 0 -> "%.4e";
                case 1 -> "%.12e";
                case 2 -> "%.6f";
                default -> "%.17g";
            };
            String s = String.format(Locale.ROOT, fmt, v);
            assertEquals(Double.parseDouble(s), p(s), s);
        }
    }

    @Test
    void readsFortranExponents() {
        assertEquals(1.234e-105, p("1.234-105"));
        assertEquals(1.234e+105, p("1.234+105"));
        assertEquals(1.234e-05, p("1.234D-05"));
        assertEquals(1.234e-05, p("1.234d-05"));
        assertEquals(-5.0e+02, p("-0.5D+03"));
        assertEquals(0.1e-300, p("0.1000-300"));
    }

    @ParameterizedTest
    @ValueSource(strings = {"nan", "-nan", "NaN", "+nan", "NAN", "nan(ind)", "-nan(ind)", "1.#QNAN", "-1.#IND",
        "1.#QNAN0", "1.#SNAN", "nanq"})
    void readsTheSpellingsOfNotANumberAsNanFromTheLog(String s) {
        double v = p(s);
        assertTrue(Double.isNaN(v), s);
        assertTrue(Numbers.isNaNValue(v), s);
        assertFalse(Numbers.isMalformed(v), s);
    }

    @Test
    void readsTheSpellingsOfInfinity() {
        for (String s : new String[] {"inf", "Inf", "INF", "Infinity", "+Infinity", "1.#INF", "1.#INF00"}) {
            assertEquals(Double.POSITIVE_INFINITY, p(s), s);
        }
        for (String s : new String[] {"-inf", "-Infinity", "-1.#INF"}) {
            assertEquals(Double.NEGATIVE_INFINITY, p(s), s);
        }
    }

    @Test
    void readsOverflowFieldsAsPositiveInfinityNotAsMalformed() {
        assertEquals(Double.POSITIVE_INFINITY, p("*******"));
        assertEquals(Double.POSITIVE_INFINITY, p("*"));
    }

    @ParameterizedTest
    @ValueSource(strings = {"1.2.3e-4", "", "   ", "abc", "1e", "1e+", "-", ".", "e5", "1,5", "0x1p3", "1.0d",
        "1.0f", "nanx", "infinit", "**1", "1.#FOO", "1-", "12:00", "2026-12-01"})
    void flagsMalformedTextDistinctlyFromNan(String s) {
        double v = p(s);
        assertTrue(Numbers.isMalformed(v), s);
        assertFalse(Numbers.isNaNValue(v), s);
    }

    @Test
    void keepsAnExactZeroAsZero() {
        assertEquals(0.0, p("0"));
        assertEquals(0.0, p("0.0000e+00"));
        assertEquals(0.0, p("0.0D0"));
        assertEquals(Double.doubleToRawLongBits(-0.0), Double.doubleToRawLongBits(p("-0.0")));
    }

    @Test
    void readsOnlyTheGivenRangeAndIgnoresBlanksAroundIt() {
        String line = "pass 12  3.5e-02 \r";
        assertEquals(3.5e-02, Numbers.parse(line, 7, line.length()));
        assertEquals(12.0, Numbers.parse(line, 4, 8));
    }

    @Test
    void readsIterationCounters() {
        assertEquals(1200, Numbers.parseCounter("1200", 0, 4));
        assertEquals(1200, Numbers.parseCounter("1.2e3", 0, 5));
        assertEquals(-1, Numbers.parseCounter("12.5", 0, 4));
        assertEquals(-1, Numbers.parseCounter("-3", 0, 2));
        assertEquals(-1, Numbers.parseCounter("x1", 0, 2));
    }
}
