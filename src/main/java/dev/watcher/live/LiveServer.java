package dev.watcher.live;

import dev.watcher.model.TimelineEvent;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import io.vertx.core.Context;
import io.vertx.core.Future;
import io.vertx.core.Vertx;
import io.vertx.core.buffer.Buffer;
import io.vertx.core.http.HttpServer;
import io.vertx.core.http.HttpServerOptions;
import io.vertx.core.http.HttpServerResponse;
import io.vertx.ext.web.Router;
import io.vertx.ext.web.RoutingContext;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.net.InetAddress;
import java.net.URLEncoder;
import java.net.UnknownHostException;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The live view: an HTTP server (Vert.x) with the runs' page, its plots updated by server-sent events,
 * a JSON API, Prometheus metrics and a health check.
 *
 * <table>
 * <caption>Routes (GET only)</caption>
 * <tr><td>/</td><td>the page (runs, latest values, open conditions, forecasts, live plots with level lines, timelines)</td></tr>
 * <tr><td>/assets/NAME</td><td>the page's own script and style and the plotting library, from the classpath;
 * a fixed list of names, nothing else is served (no directory listing, no file system)</td></tr>
 * <tr><td>/events</td><td>server-sent events: {@code hello} (every run) on connect, then the timeline events
 * the client has not seen (see below), then {@code progress} (a run's status with its forecasts, at most four
 * times per second per run, when it changed) and {@code timeline} (each event as the timeline writes it, with
 * {@code RUN:SEQ} as its id)</td></tr>
 * <tr><td>/api/runs</td><td>every run's status as JSON</td></tr>
 * <tr><td>/api/plots?run=R</td><td>the run's bounded history and the level lines of its residual plot</td></tr>
 * <tr><td>/api/events?run=R&amp;max=N</td><td>the run's last timeline events</td></tr>
 * <tr><td>/metrics</td><td>Prometheus text format (the {@link WatcherMetrics} meters and whatever else
 * the registry holds)</td></tr>
 * <tr><td>/health</td><td>{@code {"status":"up","runs":N}}</td></tr>
 * </table>
 *
 * <p>Nothing lost between the page's snapshot and its stream: the server holds the last
 * {@value #BACKLOG_MAX} timeline events it streamed (all runs together) and replays to a connecting client those
 * after the position it names, {@code /events?after=RUN:SEQ,...} (the page: the highest seq of each run in the
 * snapshot it loaded) or the standard {@code Last-Event-ID} header (a browser's reconnect), as
 * {@link StreamBacklog} describes. A client that names no position gets the live stream only.
 *
 * <p>Access: on a loopback address the token is optional; any other address refuses to start without one.
 * With a token, every request must carry it ({@code Authorization: Bearer TOKEN} or {@code ?token=TOKEN});
 * the comparison takes the same time whatever the guess.
 *
 * <p>Threading: {@link #onEvent} may be called from any thread (the journal's listener). {@link #close()}
 * must not be called on a Vert.x event-loop thread (it waits for the server to close).
 */
public final class LiveServer implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(LiveServer.class);
    private static final String WEBJAR = "META-INF/resources/webjars/uplot/1.6.30/dist/";
    private static final String OWN = "dev/watcher/live/";
    private static final long TICK_MS = 250;
    private static final long HEARTBEAT_MS = 15_000;
    private static final int EVENTS_MAX = 200;
    /** Timeline events held for replay to connecting clients, all runs together. */
    static final int BACKLOG_MAX = 1000;
    private static final String PROMETHEUS_TEXT = "text/plain; version=0.0.4; charset=utf-8";
    private static final String CSP = "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; "
            + "img-src 'self' data:; connect-src 'self'; base-uri 'none'; form-action 'none'; "
            + "frame-ancestors 'none'";

    private final Vertx vertx;
    private final LiveSource source;
    private final PrometheusMeterRegistry registry;
    private final WatcherMetrics metrics;
    private final byte[] tokenDigest;
    private final String urlHost;
    private final Map<String, Asset> assets;
    private final String page;
    private final List<Client> clients = new CopyOnWriteArrayList<>();
    /** Guards the backlog, and orders each new event's push against a client's replay and listing. */
    private final StreamBacklog backlog = new StreamBacklog(BACKLOG_MAX);
    private final Map<String, String> lastSent = new HashMap<>();
    private HttpServer server;
    private long tickTimer = -1;
    private long heartbeatTimer = -1;

    private record Asset(String contentType, Buffer body) {
    }

    /** An open event stream and the context of its connection, where every write to it is made in order. */
    private record Client(HttpServerResponse response, Context context) {
    }

    private LiveServer(Vertx vertx, String host, LiveSource source, PrometheusMeterRegistry registry,
            String token) {
        this.vertx = vertx;
        this.source = source;
        this.registry = registry;
        this.metrics = new WatcherMetrics(source, registry, WatcherMetrics.DEFAULT_SERIES_CAP);
        this.tokenDigest = token == null ? null : sha256(token);
        this.urlHost = host.contains(":") ? "[" + host + "]" : host;
        Map<String, Asset> a = new HashMap<>();
        a.put("uplot.js", new Asset("text/javascript; charset=utf-8", resource(WEBJAR + "uPlot.iife.min.js")));
        a.put("uplot.css", new Asset("text/css; charset=utf-8", resource(WEBJAR + "uPlot.min.css")));
        a.put("live.js", new Asset("text/javascript; charset=utf-8", resource(OWN + "live.js")));
        a.put("live.css", new Asset("text/css; charset=utf-8", resource(OWN + "live.css")));
        this.assets = Map.copyOf(a);
        this.page = resource(OWN + "page.html").toString(StandardCharsets.UTF_8);
    }

    /**
     * Starts the live view on {@code hostPort} ({@code 127.0.0.1:8080}; port 0 picks a free port, see
     * {@link #url()}).
     *
     * @param vertx    the daemon's Vert.x
     * @param hostPort {@code HOST:PORT}; an IPv6 host in brackets ({@code [::1]:0})
     * @param source   what the page and the metrics read
     * @param registry where the metrics live; its common tags should be set already
     *                 ({@link WatcherMetrics#commonTags})
     * @param token    the access token, or null; required when {@code HOST} is not a loopback address
     * @return the running server, or a failed future (bad address, missing token, port taken)
     */
    public static Future<LiveServer> start(Vertx vertx, String hostPort, LiveSource source,
            PrometheusMeterRegistry registry, String token) {
        Objects.requireNonNull(vertx, "vertx");
        Objects.requireNonNull(source, "source");
        Objects.requireNonNull(registry, "registry");
        String host;
        int port;
        try {
            int colon = hostPort.lastIndexOf(':');
            if (colon <= 0 || colon == hostPort.length() - 1) {
                throw new IllegalArgumentException("expected HOST:PORT, got '" + hostPort + "'");
            }
            host = hostPort.substring(0, colon);
            if (host.startsWith("[") && host.endsWith("]")) {
                host = host.substring(1, host.length() - 1);
            }
            port = Integer.parseInt(hostPort.substring(colon + 1));
            if (port < 0 || port > 65535) {
                throw new IllegalArgumentException("port out of range in '" + hostPort + "'");
            }
            if (token != null && token.isBlank()) {
                throw new IllegalArgumentException("the live view's token is empty");
            }
            if (token == null && !isLoopback(host)) {
                throw new IllegalArgumentException("the live view binds " + host
                        + ", which is not a loopback address: give a token (file or environment)");
            }
        } catch (NumberFormatException e) {
            return Future.failedFuture(new IllegalArgumentException("expected HOST:PORT, got '" + hostPort + "'"));
        } catch (IllegalArgumentException e) {
            return Future.failedFuture(e);
        }
        LiveServer live;
        try {
            live = new LiveServer(vertx, host, source, registry, token);
        } catch (RuntimeException e) {
            return Future.failedFuture(e);
        }
        return live.listen(host, port);
    }

    private static boolean isLoopback(String host) {
        try {
            for (InetAddress a : InetAddress.getAllByName(host)) {
                if (!a.isLoopbackAddress()) {
                    return false;
                }
            }
            return true;
        } catch (UnknownHostException e) {
            throw new IllegalArgumentException("unknown host '" + host + "' for the live view", e);
        }
    }

    private Future<LiveServer> listen(String host, int port) {
        Router router = Router.router(vertx);
        router.route().handler(this::guard);
        router.get("/").handler(this::page);
        router.get("/assets/:name").handler(this::asset);
        router.get("/events").handler(this::events);
        router.get("/api/runs").handler(ctx -> json(ctx, statuses()));
        router.get("/api/plots").handler(this::plots);
        router.get("/api/events").handler(this::recentEvents);
        router.get("/metrics").handler(this::scrape);
        router.get("/health").handler(ctx -> json(ctx, Map.of("status", "up", "runs", source.runs().size())));
        return vertx.createHttpServer(new HttpServerOptions().setHost(host).setPort(port))
                .requestHandler(router).listen().map(s -> {
                    server = s;
                    tickTimer = vertx.setPeriodic(TICK_MS, id -> tick());
                    heartbeatTimer = vertx.setPeriodic(HEARTBEAT_MS, id -> broadcast(": still here\n\n"));
                    LOG.info("live view at {}", url());
                    return this;
                });
    }

    /** The base URL with the actual port ({@code http://127.0.0.1:40123/}). */
    public String url() {
        return "http://" + urlHost + ":" + server.actualPort() + "/";
    }

    /** The actual port. */
    public int port() {
        return server.actualPort();
    }

    /** The metrics this server exports (to count timeline events elsewhere, see {@link #onEvent}). */
    public WatcherMetrics metrics() {
        return metrics;
    }

    /**
     * Takes one timeline event as written: counts it in the metrics and pushes it to every open page. The
     * daemon calls it from its journal listener ({@code journal.addListener(live::onEvent)}); any thread;
     * never throws.
     */
    public void onEvent(TimelineEvent e) {
        try {
            metrics.onEvent(e);
            String chunk = "id: " + StreamBacklog.id(e.run(), e.seq()) + "\n" + sse("timeline", LiveJson.event(e));
            synchronized (backlog) {
                backlog.add(new StreamBacklog.Entry(e.run(), e.seq(), chunk));
                broadcast(chunk);
            }
        } catch (RuntimeException ex) {
            LOG.debug("live view: event not pushed", ex);
        }
    }

    // --- access ---------------------------------------------------------------------------------------

    private void guard(RoutingContext ctx) {
        HttpServerResponse r = ctx.response();
        r.putHeader("X-Content-Type-Options", "nosniff");
        r.putHeader("Referrer-Policy", "no-referrer");
        r.putHeader("Cache-Control", "no-store");
        r.putHeader("Content-Security-Policy", CSP);
        if (tokenDigest != null && !authorized(ctx)) {
            r.setStatusCode(401).putHeader("WWW-Authenticate", "Bearer realm=\"watcher\"")
                    .putHeader("Content-Type", "text/plain; charset=utf-8").end("a token is required\n");
            return;
        }
        ctx.next();
    }

    private boolean authorized(RoutingContext ctx) {
        String given = null;
        String header = ctx.request().getHeader("Authorization");
        if (header != null && header.regionMatches(true, 0, "Bearer ", 0, 7)) {
            given = header.substring(7).trim();
        } else {
            given = ctx.request().getParam("token");
        }
        // digests of equal length: the comparison's time does not depend on the guess
        return given != null && MessageDigest.isEqual(sha256(given), tokenDigest);
    }

    private static byte[] sha256(String s) {
        try {
            return MessageDigest.getInstance("SHA-256").digest(s.getBytes(StandardCharsets.UTF_8));
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is missing from this JVM", e);
        }
    }

    // --- routes ---------------------------------------------------------------------------------------

    private void page(RoutingContext ctx) {
        String q = "";
        String token = ctx.request().getParam("token");
        if (tokenDigest != null && token != null) {
            // the page's own asset links carry the token it was opened with (escaped for an attribute)
            q = "?token=" + URLEncoder.encode(token, StandardCharsets.UTF_8).replace("&", "&amp;")
                    .replace("\"", "&quot;").replace("<", "&lt;");
        }
        ctx.response().putHeader("Content-Type", "text/html; charset=utf-8").end(page.replace("{{q}}", q));
    }

    private void asset(RoutingContext ctx) {
        Asset a = assets.get(ctx.pathParam("name"));
        if (a == null) {
            ctx.response().setStatusCode(404).putHeader("Content-Type", "text/plain; charset=utf-8")
                    .end("not found\n");
            return;
        }
        ctx.response().putHeader("Content-Type", a.contentType()).end(a.body());
    }

    private void plots(RoutingContext ctx) {
        String run = ctx.request().getParam("run");
        if (run == null) {
            ctx.response().setStatusCode(400).end("run is required\n");
            return;
        }
        vertx.executeBlocking(() -> source.plots(run)).onComplete(ar -> {
            if (ar.failed()) {
                ctx.fail(ar.cause());
            } else if (ar.result().isEmpty()) {
                ctx.response().setStatusCode(404).end("no such run\n");
            } else {
                json(ctx, LiveJson.plots(ar.result().get()));
            }
        });
    }

    private void recentEvents(RoutingContext ctx) {
        String run = ctx.request().getParam("run");
        int max;
        try {
            max = Math.max(1, Math.min(EVENTS_MAX, Integer.parseInt(ctx.request().getParam("max", "50"))));
        } catch (NumberFormatException e) {
            ctx.response().setStatusCode(400).end("max must be a number\n");
            return;
        }
        if (run == null) {
            ctx.response().setStatusCode(400).end("run is required\n");
            return;
        }
        vertx.executeBlocking(() -> {
            List<Object> out = new ArrayList<>();
            for (TimelineEvent e : source.recentEvents(run, max)) {
                out.add(LiveJson.event(e));
            }
            return out;
        }).onComplete(ar -> {
            if (ar.failed()) {
                ctx.fail(ar.cause());
            } else {
                json(ctx, ar.result());
            }
        });
    }

    private void scrape(RoutingContext ctx) {
        vertx.executeBlocking(() -> {
            metrics.refresh();
            return registry.scrape();
        }).onComplete(ar -> {
            if (ar.failed()) {
                ctx.fail(ar.cause());
            } else {
                ctx.response().putHeader("Content-Type", PROMETHEUS_TEXT).end(ar.result());
            }
        });
    }

    private void events(RoutingContext ctx) {
        HttpServerResponse r = ctx.response();
        r.setChunked(true).putHeader("Content-Type", "text/event-stream; charset=utf-8")
                .putHeader("X-Accel-Buffering", "no");
        List<RunStatus> runs = source.runs();
        List<Object> all = new ArrayList<>();
        for (RunStatus s : runs) {
            all.add(LiveJson.status(s));
        }
        StringBuilder first = new StringBuilder("retry: 3000\n\n").append(sse("hello", all));
        Client c = new Client(r, vertx.getOrCreateContext());
        synchronized (backlog) {
            // what the client has not seen, and the client listed, at one instant: an event pushed after this
            // block is queued on this context behind the write below, an event pushed before is in the replay
            for (String chunk : backlog.replay(ctx.request().getHeader("Last-Event-ID"),
                    ctx.request().getParam("after"))) {
                first.append(chunk);
            }
            clients.add(c);
        }
        r.write(first.toString());
        r.closeHandler(v -> clients.remove(c));
        r.exceptionHandler(t -> clients.remove(c));
    }

    private void json(RoutingContext ctx, Object value) {
        ctx.response().putHeader("Content-Type", "application/json; charset=utf-8").end(LiveJson.write(value));
    }

    private List<Object> statuses() {
        List<Object> out = new ArrayList<>();
        for (RunStatus s : source.runs()) {
            out.add(LiveJson.status(s));
        }
        return out;
    }

    // --- pushing ----------------------------------------------------------------------------------------

    private void tick() {
        List<RunStatus> runs;
        try {
            runs = source.runs();
            metrics.refresh(runs);
        } catch (RuntimeException e) {
            LOG.debug("live view: source not readable this tick", e);
            return;
        }
        StringBuilder out = new StringBuilder();
        synchronized (lastSent) {
            for (RunStatus s : runs) {
                String sig = s.state() + '|' + s.lastIter() + '|' + s.lines() + '|' + s.records() + '|'
                        + s.malformedLines() + '|' + s.openConditions() + '|' + s.forecast().hashCode();
                if (!sig.equals(lastSent.put(s.run(), sig))) {
                    out.append(sse("progress", LiveJson.status(s)));
                }
            }
        }
        if (out.length() > 0) {
            broadcast(out.toString());
        }
    }

    private static String sse(String event, Object data) {
        return "event: " + event + "\ndata: " + LiveJson.write(data) + "\n\n";
    }

    private void broadcast(String chunk) {
        for (Client c : clients) {
            c.context().runOnContext(v -> {
                HttpServerResponse r = c.response();
                if (r.writeQueueFull()) {
                    // a page that does not keep up is dropped; it reconnects and reloads its plots
                    clients.remove(c);
                    r.reset();
                    return;
                }
                r.write(chunk).onFailure(t -> clients.remove(c));
            });
        }
    }

    // --- lifecycle -------------------------------------------------------------------------------------

    /** Stops the timers, ends every event stream and closes the server. */
    public Future<Void> stop() {
        vertx.cancelTimer(tickTimer);
        vertx.cancelTimer(heartbeatTimer);
        for (Client c : clients) {
            c.context().runOnContext(v -> c.response().end());
        }
        clients.clear();
        return server == null ? Future.succeededFuture() : server.close();
    }

    /** As {@link #stop()}, waiting up to five seconds; not on an event-loop thread. */
    @Override
    public void close() {
        try {
            stop().toCompletionStage().toCompletableFuture().get(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (Exception e) {
            LOG.warn("live view did not close cleanly: {}", e.toString());
        }
    }

    private static Buffer resource(String name) {
        try (InputStream in = LiveServer.class.getClassLoader().getResourceAsStream(name)) {
            if (in == null) {
                throw new IllegalStateException("missing resource " + name + " on the classpath");
            }
            return Buffer.buffer(in.readAllBytes());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read resource " + name, e);
        }
    }
}
