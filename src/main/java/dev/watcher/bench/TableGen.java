package dev.watcher.bench;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.SplittableRandom;

/**
 * Writes the replay benchmark's input: a whitespace table with a header line, the iteration and eight numeric
 * columns (seven residuals and one monitor) printed as {@code %.4e}, following a plausible noisy decaying
 * residual history. Deterministic: the same line count always gives the same bytes. About 96 bytes a line,
 * so 3,000,000 lines make about 290 MB.
 *
 * <p>Usage: {@code TableGen OUTPUT LINES}.
 */
public final class TableGen {

    /** The column names after the iteration column. */
    public static final String[] COLUMNS = {"cont", "mom-x", "mom-y", "temp", "k", "omega", "vof", "vmid"};

    private static final int RESIDUALS = 7;
    private static final long SEED = 20_260_301L;

    private TableGen() {
    }

    public static void main(String[] args) throws IOException {
        if (args.length != 2) {
            System.err.println("usage: TableGen OUTPUT LINES");
            System.exit(2);
        }
        long lines = Long.parseLong(args[1].replace("_", ""));
        long t0 = System.nanoTime();
        long bytes = write(Path.of(args[0]), lines);
        System.err.printf("wrote %d lines, %.1f MB to %s in %.1f s%n", lines, bytes / 1e6, args[0],
                (System.nanoTime() - t0) / 1e9);
    }

    /**
     * Writes the header and {@code lines} data lines to {@code out}.
     *
     * @return the number of bytes written
     */
    public static long write(Path out, long lines) throws IOException {
        if (lines < 0) {
            throw new IllegalArgumentException("lines must be >= 0, got " + lines);
        }
        int width = Math.max(7, Long.toString(lines).length());
        SplittableRandom rnd = new SplittableRandom(SEED);
        // per residual: starting decade, decades dropped over the run, time constant as a share of the run
        double[] start = {0.0, -0.3, -0.4, -1.0, -0.6, 0.2, -1.5};
        double[] drop = {5.2, 5.5, 5.4, 6.0, 4.8, 4.5, 5.0};
        double[] tauShare = {0.18, 0.15, 0.16, 0.25, 0.20, 0.22, 0.12};
        double[] noise = new double[RESIDUALS];
        double span = Math.max(1, lines);
        byte[] buf = new byte[1 << 20];
        int p = 0;
        long total = 0;
        try (OutputStream os = Files.newOutputStream(out)) {
            StringBuilder head = new StringBuilder("#");
            head.append(" ".repeat(Math.max(1, width - 5))).append("pass");
            for (String c : COLUMNS) {
                head.append(' ').append(" ".repeat(10 - c.length())).append(c);
            }
            head.append('\n');
            byte[] h = head.toString().getBytes(java.nio.charset.StandardCharsets.US_ASCII);
            os.write(h);
            total += h.length;
            for (long i = 1; i <= lines; i++) {
                if (p > buf.length - 256) {
                    os.write(buf, 0, p);
                    total += p;
                    p = 0;
                }
                p = putIteration(buf, p, i, width);
                double x = i / span;
                for (int j = 0; j < RESIDUALS; j++) {
                    // AR(1) noise in log10 space, plus the slow decay and a faint wobble
                    noise[j] = 0.92 * noise[j] + 0.06 * rnd.nextGaussian();
                    double log10 = start[j] - drop[j] * (1 - Math.exp(-x / tauShare[j]))
                            + 0.08 * Math.sin(i / (37.0 + 11 * j)) + noise[j];
                    buf[p++] = ' ';
                    p = putLog10(buf, p, log10);
                }
                double vmid = 0.2134 + 0.06 * Math.exp(-x / 0.1) * Math.cos(i / 53.0) + 2e-4 * rnd.nextGaussian();
                buf[p++] = ' ';
                p = putSci(buf, p, vmid);
                buf[p++] = '\n';
            }
            os.write(buf, 0, p);
            total += p;
        }
        return total;
    }

    private static int putIteration(byte[] b, int p, long v, int width) {
        int digits = 1;
        for (long t = v; t >= 10; t /= 10) {
            digits++;
        }
        for (int k = digits; k < width; k++) {
            b[p++] = ' ';
        }
        int end = p + digits;
        for (int k = end - 1; k >= p; k--) {
            b[k] = (byte) ('0' + v % 10);
            v /= 10;
        }
        return end;
    }

    /** Writes the positive number {@code 10^log10} in {@code %.4e} form. */
    static int putLog10(byte[] b, int p, double log10) {
        return putLog10Signed(b, p, false, log10);
    }

    /** Writes a finite number in {@code %.4e} form (rounding may differ from the JDK's in the last digit). */
    static int putSci(byte[] b, int p, double v) {
        if (v == 0) {
            return putDigits(b, p, false, 0, 0);
        }
        boolean neg = v < 0;
        return neg ? putLog10Signed(b, p, true, Math.log10(-v)) : putLog10Signed(b, p, false, Math.log10(v));
    }

    private static int putLog10Signed(byte[] b, int p, boolean neg, double log10) {
        int e = (int) Math.floor(log10);
        int m = (int) Math.round(Math.pow(10, log10 - e) * 10_000);
        if (m >= 100_000) {
            m = 10_000;
            e++;
        } else if (m < 10_000) {
            m = 10_000;
        }
        return putDigits(b, p, neg, m, e);
    }

    /**
     * Writes {@code m / 10^4 x 10^e} as {@code d.dddde+XX}: {@code m} holds the five significant digits
     * (10000..99999, or 0), the exponent has at least two digits, as {@code %.4e} prints it.
     */
    static int putDigits(byte[] b, int p, boolean neg, int m, int e) {
        if (neg) {
            b[p++] = '-';
        }
        b[p++] = (byte) ('0' + m / 10_000);
        b[p++] = '.';
        b[p++] = (byte) ('0' + m / 1000 % 10);
        b[p++] = (byte) ('0' + m / 100 % 10);
        b[p++] = (byte) ('0' + m / 10 % 10);
        b[p++] = (byte) ('0' + m % 10);
        b[p++] = 'e';
        b[p++] = (byte) (e < 0 ? '-' : '+');
        int a = Math.abs(e);
        if (a >= 100) {
            b[p++] = (byte) ('0' + a / 100);
            a %= 100;
        }
        b[p++] = (byte) ('0' + a / 10);
        b[p++] = (byte) ('0' + a % 10);
        return p;
    }
}
