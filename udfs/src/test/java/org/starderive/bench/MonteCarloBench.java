package org.starderive.bench;

import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.MonteCarloDeriver;
import org.starderive.physics.StarInput;

/**
 * ns per star of the Monte Carlo percentiles ({@link MonteCarloDeriver#percentiles}) on one thread, over the same
 * 4096 stars as {@link StarDeriverBench} (its mixes: {@code fgk}, the stars of every earlier measurement, and the
 * survey-like {@code main_sequence}), with the default settings and {@code draws} draws per star. Divide by the
 * draws for the cost of one draw. Run with {@code scripts/bench-kernel MonteCarloBench}; not part of the test suite.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(value = 1, jvmArgs = {"-Xmx1g"})
public class MonteCarloBench {
    @Param({"128"})
    public int draws;

    @Param({"fgk", "main_sequence"})
    public String mix;

    private MonteCarloDeriver mc;
    private StarInput[] stars;
    private final double[][] out = new double[MonteCarloDeriver.NQ][3];
    private int i;

    @Setup(Level.Trial)
    public void setup() {
        mc = new MonteCarloDeriver(DeriveSettings.builder().build(), draws, 1L);
        stars = StarDeriverBench.stars(mix);
    }

    @Benchmark
    public double perStar() {
        StarInput in = stars[i];
        mc.percentiles(in, i, out);
        i = (i + 1) & (stars.length - 1);
        return out[1][1];
    }
}
