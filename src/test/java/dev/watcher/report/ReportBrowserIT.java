package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.bench.ReportBench;
import dev.watcher.bench.ReportBench.Scenario;
import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A generated report opened by a real headless Chromium (Debian's {@code chromium}): the page script draws
 * every plot and writes its self-check (canvases with drawn pixels, markers drawn, errors caught) into the
 * DOM, which {@code --dump-dom} returns; the browser's console log must be empty. A screenshot is kept as
 * a test artifact under the build directory ({@code report-it/report.png}).
 *
 * <p>With the environment variable {@code CI} set, a missing chromium fails the test ({@code .ci/up.d}
 * installs it); elsewhere the test is skipped.
 */
class ReportBrowserIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path tmp;

    static Path chromium() {
        for (String dir : System.getenv().getOrDefault("PATH", "/usr/bin").split(File.pathSeparator)) {
            for (String name : new String[] {"chromium", "chromium-browser"}) {
                Path p = Path.of(dir, name);
                if (Files.isExecutable(p)) {
                    return p;
                }
            }
        }
        return null;
    }

    /** The build directory (target/ unless the build was pointed elsewhere): where test classes live. */
    static Path buildDir() throws Exception {
        return Path.of(ReportBrowserIT.class.getProtectionDomain().getCodeSource().getLocation().toURI()).getParent();
    }

    @Test
    void generatedReportRendersItsPlotsAndMarkersWithoutErrorsInHeadlessChromium() throws Exception {
        Path chromium = chromium();
        if (chromium == null) {
            if (System.getenv("CI") != null) {
                fail("chromium is not installed (.ci/up.d/20-chromium.sh installs it)");
            }
            Assumptions.abort("chromium is not installed; skipped outside CI");
        }
        Path state = tmp.resolve("state");
        String evil = "<img src=x onerror=alert(1)>";
        ReportBench.generate(state, "header", 200_000, Scenario.CONVERGING, evil);
        ReportBench.generate(state, "tunnel-fan", 50_000, Scenario.STOPPED, "");
        ReportBench.generate(state, "rooftop", 40_000, Scenario.UNSTEADY, "");
        Path artifacts = buildDir().resolve("report-it");
        Files.createDirectories(artifacts);
        Path report = ReportWriter.write(state, artifacts.resolve("report.html"), ZoneId.of("Europe/Berlin"));
        String html = Files.readString(report);
        int plots = count(html, "class=\"canvas\"");
        assertEquals(3 + 2 + 3, plots, "plots: header residuals + 2 monitors, tunnel-fan residuals +"
                + " monitor, rooftop residuals + monitor + steps");

        Run dom = run(chromium, List.of("--virtual-time-budget=15000", "--dump-dom", report.toUri().toString()));
        List<String> console = new ArrayList<>();
        for (String line : dom.stderr.split("\n")) {
            if (line.contains("CONSOLE")) {
                console.add(line);
            }
        }
        assertTrue(console.isEmpty(), "console messages: " + console);
        Matcher m = Pattern.compile("id=\"self-check\"[^>]*data-done=\"1\"[^>]*>([^<]*)</pre>").matcher(dom.stdout);
        assertTrue(m.find(), "the page's self-check ran; dump starts: " + dom.stdout.substring(0,
                Math.min(300, dom.stdout.length())) + "\nstderr: " + dom.stderr);
        JsonNode check = JSON.readTree(m.group(1).replace("&quot;", "\"").replace("&lt;", "<").replace("&gt;", ">")
                .replace("&amp;", "&"));
        assertEquals(0, check.path("errors").size(), "errors caught in the page: " + check.path("errors"));
        assertEquals(0, check.path("failed").asInt(), "plots that failed to build");
        assertEquals(plots, check.path("charts").asInt(), "plots built");
        assertEquals(plots, check.path("canvases").asInt(), "canvases");
        assertEquals(plots, check.path("nonBlank").asInt(), "canvases with drawn pixels");
        assertTrue(check.path("seriesDrawn").asInt() >= plots, "series drawn: " + check);
        // condition markers from the generated timelines: header: blow-up opened + resolved, converged opened,
        // drag-force settled opened; tunnel-fan: divergence opened; rooftop: rising peaks and non-finite opened,
        // on its residual plot and again at their time steps on its per-step plot
        assertEquals(9, check.path("markers").asInt(), "markers drawn: " + check);
        assertEquals(1, check.path("bands").asInt(), "settled bands: " + check);
        // tunnel-fan: the stop requested and carried out at one iteration is one mark
        assertEquals(1, check.path("actions").asInt(), "stop marks: " + check);
        assertTrue(check.path("predicted").asInt() >= 2, "predicted final values: " + check);
        assertTrue(check.path("levels").asInt() >= 3, "residual levels: " + check);
        assertTrue(check.path("nonFinite").asInt() >= 1, "non-finite marks: " + check);
        // the decorated names came through as text, never as elements
        assertFalse(Pattern.compile("(?i)<img\\b").matcher(dom.stdout).find(), "an <img> element was injected");
        assertTrue(dom.stdout.contains("&lt;img src=x onerror=alert(1)&gt;"), "the name shown as text");

        Path shot = artifacts.resolve("report.png");
        Files.deleteIfExists(shot);
        run(chromium, List.of("--virtual-time-budget=15000", "--window-size=1280,2000", "--screenshot=" + shot,
                report.toUri().toString()));
        assertTrue(Files.exists(shot) && Files.size(shot) > 20_000, "screenshot " + shot);
    }

    private static int count(String s, String what) {
        int n = 0;
        for (int i = s.indexOf(what); i >= 0; i = s.indexOf(what, i + 1)) {
            n++;
        }
        return n;
    }

    private record Run(String stdout, String stderr) {
    }

    private Run run(Path chromium, List<String> args) throws IOException, InterruptedException {
        Path profile = Files.createTempDirectory(tmp, "profile");
        List<String> cmd = new ArrayList<>(List.of(chromium.toString(), "--headless", "--no-sandbox", "--disable-gpu",
                "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync",
                "--disable-quic", "--user-data-dir=" + profile, "--enable-logging=stderr", "--v=0"));
        cmd.addAll(args);
        Path out = Files.createTempFile(tmp, "out", ".txt");
        Path err = Files.createTempFile(tmp, "err", ".txt");
        Process p = new ProcessBuilder(cmd).redirectOutput(out.toFile()).redirectError(err.toFile()).start();
        if (!p.waitFor(180, TimeUnit.SECONDS)) {
            p.descendants().forEach(ProcessHandle::destroyForcibly);
            p.destroyForcibly();
            fail("chromium did not finish within 180 s: " + cmd);
        }
        return new Run(Files.readString(out, StandardCharsets.UTF_8), Files.readString(err, StandardCharsets.UTF_8));
    }
}
