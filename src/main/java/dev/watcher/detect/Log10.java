package dev.watcher.detect;

/** The log scale the residual detectors work on. */
final class Log10 {
    private Log10() {
    }

    /** log10 of a positive finite value; NaN for zero, negative, NaN or infinite values (no log of zero). */
    static double of(double v) {
        return v > 0 && v < Double.POSITIVE_INFINITY ? Math.log10(v) : Double.NaN;
    }

    /** A number rounded to 4 significant digits for evidence and summaries (stable across platforms). */
    static double round(double v) {
        if (!Double.isFinite(v) || v == 0) {
            return v;
        }
        return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).doubleValue();
    }

    /** A residual value in scientific notation with 2 decimals, e.g. {@code 3.20e-04}. */
    static String sci(double v) {
        return String.format(java.util.Locale.ROOT, "%.2e", v);
    }
}
