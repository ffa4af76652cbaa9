package dev.watcher.parse;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import dev.watcher.model.AsciiText;

/**
 * Fast, tolerant parsing of the numbers solvers print. Pure, stateless and safe to share between threads.
 *
 * <p>Accepted besides ordinary decimals ({@code 3.2e-02}, {@code -0.5}, {@code 12}): Fortran exponents
 * ({@code 1.234D-05}, {@code 1.234d+05}, and the letterless {@code 1.234-105} that Fortran prints when the
 * exponent needs three digits); the many spellings of not-a-number ({@code nan}, {@code -nan}, {@code NaN},
 * {@code nan(ind)}, {@code 1.#QNAN}, {@code -1.#IND}) and of infinity ({@code inf}, {@code Infinity},
 * {@code -Infinity}, {@code 1.#INF}); and overflow fields made of asterisks ({@code *******}, what a
 * fixed-width format prints when a value outgrows it) which are reported as {@code +Infinity}: a blow-up,
 * not a malformed line.
 *
 * <p>Anything else ({@code 1.2.3e-4}, {@code 1e}, {@code abc}, an empty field) is malformed: the result is
 * {@link #MALFORMED}, a NaN with its own payload, so a caller tells "the log said NaN" ({@link #isNaNValue})
 * from "this is not a number" ({@link #isMalformed}) without an exception or a second return value.
 * Never throws.
 */
public final class Numbers {

    /** Raw bits of {@link #MALFORMED}: a quiet NaN whose payload no arithmetic produces. */
    public static final long MALFORMED_BITS = 0x7ff80000_0badf00dL;

    /**
     * The value returned for text that is not a number. It is a NaN: test it with {@link #isMalformed}
     * (never with {@code ==}) before using a parsed value.
     */
    public static final double MALFORMED = Double.longBitsToDouble(MALFORMED_BITS);

    private static final double[] POW10 = {
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18,
        1e19, 1e20, 1e21, 1e22};
    private static final long TWO_53 = 1L << 53;

    private Numbers() {
    }

    /** True when {@code v} is the {@link #MALFORMED} sentinel (and not a NaN the log printed). */
    public static boolean isMalformed(double v) {
        return Double.doubleToRawLongBits(v) == MALFORMED_BITS;
    }

    /** True when {@code v} is a NaN that the log printed (any NaN but the {@link #MALFORMED} sentinel). */
    public static boolean isNaNValue(double v) {
        return Double.isNaN(v) && !isMalformed(v);
    }

    /** Parses all of {@code s}; see {@link #parse(CharSequence, int, int)}. */
    public static double parse(CharSequence s) {
        return s == null ? MALFORMED : parse(s, 0, s.length());
    }

    /**
     * Parses {@code s[from, to)}, ignoring blanks around it. Returns the value, {@code NaN} or an infinity
     * when the log printed one, {@code +Infinity} for an overflow field of asterisks, and {@link #MALFORMED}
     * for anything else. Does not keep a reference to {@code s}.
     */
    public static double parse(CharSequence s, int from, int to) {
        while (from < to && isBlank(s.charAt(from))) {
            from++;
        }
        while (to > from && isBlank(s.charAt(to - 1))) {
            to--;
        }
        if (from >= to) {
            return MALFORMED;
        }
        int i = from;
        boolean negative = false;
        char c = s.charAt(i);
        if (c == '+' || c == '-') {
            negative = c == '-';
            i++;
            if (i == to) {
                return MALFORMED;
            }
            c = s.charAt(i);
        }
        if (c == '*') {
            return allStars(s, i, to) ? Double.POSITIVE_INFINITY : MALFORMED;
        }
        if (c == 'n' || c == 'N' || c == 'i' || c == 'I') {
            return word(s, i, to, negative);
        }
        // One pass: validate and accumulate the significant digits; the exponent comes after.
        long mantissa = 0;
        int significant = 0;
        int dropped = 0; // integer digits beyond what a long holds
        int fractionDigits = 0;
        boolean digits = false;
        boolean dot = false;
        for (; i < to; i++) {
            c = s.charAt(i);
            if (c >= '0' && c <= '9') {
                digits = true;
                if (significant < 18) {
                    if (mantissa != 0 || c != '0') {
                        significant++;
                    }
                    mantissa = mantissa * 10 + (c - '0');
                    if (dot) {
                        fractionDigits++;
                    }
                } else {
                    significant++;
                    if (!dot) {
                        dropped++;
                    }
                }
            } else if (c == '.') {
                if (dot) {
                    return MALFORMED; // 1.2.3e-4
                }
                dot = true;
            } else {
                break;
            }
        }
        if (!digits) {
            return MALFORMED;
        }
        int mantissaEnd = i;
        long exponent = 0;
        boolean fortran = false;
        if (i < to) {
            c = s.charAt(i);
            if (c == '#') {
                return msvcSpecial(s, i + 1, to, negative);
            }
            boolean letter = c == 'e' || c == 'E' || c == 'd' || c == 'D';
            if (!letter && c != '+' && c != '-') {
                return MALFORMED;
            }
            fortran = c != 'e' && c != 'E';
            if (letter) {
                i++;
                if (i == to) {
                    return MALFORMED; // 1e
                }
                c = s.charAt(i);
            }
            boolean expNegative = false;
            if (c == '+' || c == '-') {
                expNegative = c == '-';
                i++;
            }
            if (i == to) {
                return MALFORMED;
            }
            for (; i < to; i++) {
                c = s.charAt(i);
                if (c < '0' || c > '9') {
                    return MALFORMED;
                }
                if (exponent < 100_000) {
                    exponent = exponent * 10 + (c - '0');
                }
            }
            if (expNegative) {
                exponent = -exponent;
            }
        }
        if (mantissa == 0) {
            return negative ? -0.0 : 0.0;
        }
        if (significant <= 18 && dropped == 0) {
            // Clinger's fast path: an exact integer below 2^53 times or divided by an exact power of ten is
            // correctly rounded by one IEEE operation (W. D. Clinger, "How to read floating point numbers
            // accurately", PLDI 1990). It covers what solvers print with %.4e.
            long k = exponent - fractionDigits;
            if (mantissa < TWO_53 && k >= -22 && k <= 22) {
                double m = mantissa;
                double v = k < 0 ? m / POW10[(int) -k] : m * POW10[(int) k];
                return negative ? -v : v;
            }
        }
        return slowPath(s, from, mantissaEnd, to, exponent, fortran);
    }

    /**
     * Reads the token starting at {@code from} (not a blank) up to the next blank or carriage return (or
     * {@code to}) in one pass, storing the token's end in {@code end[0]}. Same results as
     * {@link #parse(CharSequence, int, int)} over the token; the table parser's hot path.
     */
    static double scan(CharSequence s, int from, int to, int[] end) {
        int i = from;
        char c = s.charAt(i);
        boolean negative = false;
        if (c == '-' || c == '+') {
            negative = c == '-';
            i++;
        }
        long mantissa = 0;
        int significant = 0;
        int fractionDigits = 0;
        boolean digits = false;
        boolean dot = false;
        for (; i < to; i++) {
            c = s.charAt(i);
            if (c >= '0' && c <= '9') {
                if (significant >= 18) {
                    return scanSlow(s, from, to, end);
                }
                digits = true;
                if (mantissa != 0 || c != '0') {
                    significant++;
                }
                mantissa = mantissa * 10 + (c - '0');
                if (dot) {
                    fractionDigits++;
                }
            } else if (c == '.' && !dot) {
                dot = true;
            } else {
                break;
            }
        }
        int exponent = 0;
        if (i < to && (c == 'e' || c == 'E')) {
            i++;
            boolean expNegative = false;
            if (i < to) {
                c = s.charAt(i);
                if (c == '+' || c == '-') {
                    expNegative = c == '-';
                    i++;
                }
            }
            int first = i;
            for (; i < to; i++) {
                c = s.charAt(i);
                if (c < '0' || c > '9') {
                    break;
                }
                exponent = exponent * 10 + (c - '0');
            }
            if (i == first || i - first > 4) {
                return scanSlow(s, from, to, end);
            }
            if (expNegative) {
                exponent = -exponent;
            }
        }
        if (i < to) {
            c = s.charAt(i);
            if (c != ' ' && c != '\t' && c != '\r') {
                return scanSlow(s, from, to, end);
            }
        }
        if (!digits) {
            return scanSlow(s, from, to, end);
        }
        end[0] = i;
        if (mantissa == 0) {
            return negative ? -0.0 : 0.0;
        }
        int k = exponent - fractionDigits;
        if (mantissa < TWO_53 && k >= -22 && k <= 22) {
            double m = mantissa;
            double v = k < 0 ? m / POW10[-k] : m * POW10[k];
            return negative ? -v : v;
        }
        return parse(s, from, i);
    }

    /**
     * {@link #scan} over the bytes of an ASCII line, without a call through {@link CharSequence} per
     * character: the same results (anything unusual goes to the same slow path).
     */
    static double scanAscii(AsciiText t, int from, int to, int[] end) {
        byte[] b = t.array();
        int o = t.offset();
        // The shape solvers print most ("%.4e": [-]d.dddde+dd) read at fixed positions; the value is the one
        // the general loop below computes (the same mantissa, digit count and exponent, the same operation).
        int p = from;
        boolean neg = b[o + p] == '-';
        if (neg) {
            p++;
        }
        if (p + 10 <= to) {
            int q = o + p;
            int d0 = b[q] - '0';
            int d1 = b[q + 2] - '0';
            int d2 = b[q + 3] - '0';
            int d3 = b[q + 4] - '0';
            int d4 = b[q + 5] - '0';
            int e1 = b[q + 8] - '0';
            int e2 = b[q + 9] - '0';
            byte es = b[q + 7];
            byte after = p + 10 < to ? b[q + 10] : (byte) ' ';
            if (b[q + 1] == '.' && (b[q + 6] == 'e' || b[q + 6] == 'E') && (es == '+' || es == '-')
                    && (char) d0 < 10 && (char) d1 < 10 && (char) d2 < 10 && (char) d3 < 10 && (char) d4 < 10
                    && (char) e1 < 10 && (char) e2 < 10 && (after == ' ' || after == '\t' || after == '\r')) {
                long mantissa = d0 * 10000L + d1 * 1000 + d2 * 100 + d3 * 10 + d4;
                end[0] = p + 10;
                if (mantissa == 0) {
                    return neg ? -0.0 : 0.0;
                }
                int k = (es == '-' ? -(e1 * 10 + e2) : e1 * 10 + e2) - 4;
                if (k >= -22 && k <= 22) {
                    double m = mantissa;
                    double v = k < 0 ? m / POW10[-k] : m * POW10[k];
                    return neg ? -v : v;
                }
            }
        }
        int i = from;
        char c = (char) b[o + i];
        boolean negative = false;
        if (c == '-' || c == '+') {
            negative = c == '-';
            i++;
        }
        long mantissa = 0;
        int significant = 0;
        int fractionDigits = 0;
        boolean digits = false;
        boolean dot = false;
        for (; i < to; i++) {
            c = (char) b[o + i];
            if (c >= '0' && c <= '9') {
                if (significant >= 18) {
                    return scanSlow(t, from, to, end);
                }
                digits = true;
                if (mantissa != 0 || c != '0') {
                    significant++;
                }
                mantissa = mantissa * 10 + (c - '0');
                if (dot) {
                    fractionDigits++;
                }
            } else if (c == '.' && !dot) {
                dot = true;
            } else {
                break;
            }
        }
        int exponent = 0;
        if (i < to && (c == 'e' || c == 'E')) {
            i++;
            boolean expNegative = false;
            if (i < to) {
                c = (char) b[o + i];
                if (c == '+' || c == '-') {
                    expNegative = c == '-';
                    i++;
                }
            }
            int first = i;
            for (; i < to; i++) {
                c = (char) b[o + i];
                if (c < '0' || c > '9') {
                    break;
                }
                exponent = exponent * 10 + (c - '0');
            }
            if (i == first || i - first > 4) {
                return scanSlow(t, from, to, end);
            }
            if (expNegative) {
                exponent = -exponent;
            }
        }
        if (i < to) {
            c = (char) b[o + i];
            if (c != ' ' && c != '\t' && c != '\r') {
                return scanSlow(t, from, to, end);
            }
        }
        if (!digits) {
            return scanSlow(t, from, to, end);
        }
        end[0] = i;
        if (mantissa == 0) {
            return negative ? -0.0 : 0.0;
        }
        int k = exponent - fractionDigits;
        if (mantissa < TWO_53 && k >= -22 && k <= 22) {
            double m = mantissa;
            double v = k < 0 ? m / POW10[-k] : m * POW10[k];
            return negative ? -v : v;
        }
        return parse(t, from, i);
    }

    private static double scanSlow(CharSequence s, int from, int to, int[] end) {
        int i = from;
        while (i < to) {
            char c = s.charAt(i);
            if (c == ' ' || c == '\t' || c == '\r') {
                break;
            }
            i++;
        }
        end[0] = i;
        return parse(s, from, i);
    }

    private static double slowPath(CharSequence s, int from, int mantissaEnd, int to, long exponent,
            boolean fortran) {
        try {
            if (!fortran) {
                return JavaDoubleParser.parseDouble(s, from, to - from);
            }
            // Rare: rebuild a Java-syntax number from the Fortran one.
            StringBuilder b = new StringBuilder(mantissaEnd - from + 8);
            b.append(s, from, mantissaEnd).append('e').append(exponent);
            return JavaDoubleParser.parseDouble(b);
        } catch (NumberFormatException e) {
            return MALFORMED;
        }
    }

    private static boolean allStars(CharSequence s, int i, int to) {
        for (; i < to; i++) {
            if (s.charAt(i) != '*') {
                return false;
            }
        }
        return true;
    }

    /** nan, nan(ind), nanq, inf, infinity, in any case. */
    private static double word(CharSequence s, int i, int to, boolean negative) {
        if (regionIs(s, i, to, "nan")) {
            int rest = i + 3;
            if (rest == to || (to - rest == 1 && (lower(s.charAt(rest)) == 'q' || lower(s.charAt(rest)) == 's'))
                    || (s.charAt(rest) == '(' && s.charAt(to - 1) == ')')) {
                return Double.NaN;
            }
            return MALFORMED;
        }
        if (regionIs(s, i, to, "infinity") && to - i == 8 || regionIs(s, i, to, "inf") && to - i == 3) {
            return negative ? Double.NEGATIVE_INFINITY : Double.POSITIVE_INFINITY;
        }
        return MALFORMED;
    }

    /** After {@code 1.#}: QNAN, SNAN, IND (NaN) or INF, optionally followed by digits ({@code 1.#INF00}). */
    private static double msvcSpecial(CharSequence s, int i, int to, boolean negative) {
        int end = to;
        while (end > i && Character.isDigit(s.charAt(end - 1))) {
            end--;
        }
        if (end - i == 4 && (regionIs(s, i, end, "qnan") || regionIs(s, i, end, "snan"))
                || end - i == 3 && regionIs(s, i, end, "ind")) {
            return Double.NaN;
        }
        if (end - i == 3 && regionIs(s, i, end, "inf")) {
            return negative ? Double.NEGATIVE_INFINITY : Double.POSITIVE_INFINITY;
        }
        return MALFORMED;
    }

    private static boolean regionIs(CharSequence s, int i, int to, String lowerWord) {
        if (to - i < lowerWord.length()) {
            return false;
        }
        for (int k = 0; k < lowerWord.length(); k++) {
            if (lower(s.charAt(i + k)) != lowerWord.charAt(k)) {
                return false;
            }
        }
        return true;
    }

    private static char lower(char c) {
        return c >= 'A' && c <= 'Z' ? (char) (c + 32) : c;
    }

    private static boolean isBlank(char c) {
        return c == ' ' || c == '\t' || c == '\r';
    }

    /**
     * Parses an iteration counter: a plain non-negative integer, or a number with an integral value
     * ({@code 1.2e3}). Returns -1 when {@code s[from, to)} is neither.
     */
    public static long parseCounter(CharSequence s, int from, int to) {
        while (from < to && isBlank(s.charAt(from))) {
            from++;
        }
        while (to > from && isBlank(s.charAt(to - 1))) {
            to--;
        }
        if (from >= to || to - from > 18) {
            return counterFromDouble(s, from, to);
        }
        long v = 0;
        for (int i = from; i < to; i++) {
            char c = s.charAt(i);
            if (c < '0' || c > '9') {
                return counterFromDouble(s, from, to);
            }
            v = v * 10 + (c - '0');
        }
        return v;
    }

    private static long counterFromDouble(CharSequence s, int from, int to) {
        double d = parse(s, from, to);
        if (Double.isNaN(d) || d < 0 || d > 9.0e15 || d != Math.rint(d)) {
            return -1;
        }
        return (long) d;
    }
}
