/**
 * Small, pure statistics for the detectors: trend tests on autocorrelated series (Mann–Kendall with exact
 * small-sample tails and the Hamed–Rao variance correction), Theil–Sen slopes with Sen's interval, the
 * tabular CUSUM, robust location and scale, a quadratic fit with a t-test on its curvature, and Holm's
 * step-down correction. Each class names its published source.
 *
 * <p>Everything here works on plain arrays (the first {@code n} values), allocates little, keeps no state
 * between calls (except {@link dev.watcher.detect.stats.Cusum}, which is a running statistic), reads no
 * clock and does no I/O. None of it is thread-safe beyond being stateless.
 */
package dev.watcher.detect.stats;
