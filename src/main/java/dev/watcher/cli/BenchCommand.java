package dev.watcher.cli;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Parameters;

@Command(name = "bench", mixinStandardHelpOptions = true,
        description = "Generate a whitespace table log (iteration + 8 columns, %%.4e) of N lines: watcher bench"
                + " gen FILE N. The full benchmark against mawk is bench/run-bench.sh (README).")
final class BenchCommand implements Callable<Integer> {

    @Parameters(arity = "1..*", paramLabel = "ARGS", description = "gen FILE LINES")
    List<String> args = new ArrayList<>();

    @Override
    public Integer call() throws Exception {
        if (args.size() == 3 && args.get(0).equals("gen")) {
            dev.watcher.bench.TableGen.main(new String[] {args.get(1), args.get(2)});
            return 0;
        }
        throw new Main.UserError("usage: watcher bench gen FILE LINES");
    }
}
