package org.starderive.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.io.File;
import java.io.IOException;
import java.util.List;
import java.util.Map;
import org.jfree.chart.ChartUtils;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.LookupPaintScale;
import org.jfree.chart.renderer.xy.XYBarRenderer;
import org.jfree.chart.renderer.xy.XYBlockRenderer;
import org.jfree.chart.renderer.xy.XYLineAndShapeRenderer;
import org.jfree.chart.title.PaintScaleLegend;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.data.xy.DefaultXYZDataset;
import org.jfree.data.xy.XYSeries;
import org.jfree.data.xy.XYSeriesCollection;

/** PNG charts for the reports (JFreeChart, headless). Inputs are small binned tables, never the catalogue. */
final class Charts {
    private Charts() {}

    static {
        System.setProperty("java.awt.headless", "true");
    }

    static final int HR_WIDTH = 900;
    static final int HR_HEIGHT = 700;
    static final int PLOT_WIDTH = 720;
    static final int PLOT_HEIGHT = 450;

    private static void style(JFreeChart c) {
        c.setBackgroundPaint(Color.WHITE);
        c.getXYPlot().setBackgroundPaint(Color.WHITE);
        c.getXYPlot().setDomainGridlinePaint(new Color(220, 220, 220));
        c.getXYPlot().setRangeGridlinePaint(new Color(220, 220, 220));
    }

    /** Histogram from bin lower edges and counts. */
    static void histogram(File png, String title, String xLabel, double[] lo, double width, long[] counts) throws IOException {
        XYSeries s = new XYSeries("stars");
        for (int i = 0; i < lo.length; i++) {
            s.add(lo[i] + width / 2, counts[i]);
        }
        XYSeriesCollection d = new XYSeriesCollection(s);
        d.setIntervalWidth(width);
        NumberAxis x = new NumberAxis(xLabel);
        x.setAutoRangeIncludesZero(false);
        NumberAxis y = new NumberAxis("stars per bin");
        XYBarRenderer r = new XYBarRenderer(0.05);
        r.setShadowVisible(false);
        r.setSeriesPaint(0, new Color(60, 90, 150));
        r.setBarPainter(new org.jfree.chart.renderer.xy.StandardXYBarPainter());
        XYPlot p = new XYPlot(d, x, y, r);
        JFreeChart c = new JFreeChart(title, new Font("SansSerif", Font.BOLD, 14), p, false);
        style(c);
        ChartUtils.saveChartAsPNG(png, c, PLOT_WIDTH, PLOT_HEIGHT);
    }

    /** A log10 Teff axis whose ticks sit at round temperatures. */
    private static final class KelvinAxis extends NumberAxis {
        private static final long serialVersionUID = 1L;
        private static final double[] TEFF_TICKS = {2500, 3000, 3500, 4000, 4500, 5000, 6000, 7000, 8000, 9000, 10000,
                12000, 15000, 20000};

        KelvinAxis(String label) {
            super(label);
        }

        @Override
        public java.util.List refreshTicks(java.awt.Graphics2D g2, org.jfree.chart.axis.AxisState state,
                                           java.awt.geom.Rectangle2D dataArea, RectangleEdge edge) {
            java.util.List<org.jfree.chart.axis.NumberTick> ticks = new java.util.ArrayList<>();
            java.text.DecimalFormat f = new java.text.DecimalFormat("#,##0");
            for (double t : TEFF_TICKS) {
                double x = Math.log10(t);
                if (getRange().contains(x)) {
                    ticks.add(new org.jfree.chart.axis.NumberTick(x, f.format(t),
                            org.jfree.chart.ui.TextAnchor.TOP_CENTER, org.jfree.chart.ui.TextAnchor.CENTER, 0.0));
                }
            }
            return ticks;
        }
    }

    /**
     * Hertzsprung–Russell diagram as a density map: x = log10 Teff (Teff increasing to the left, labelled in K),
     * y = log10 L/L⊙, shade = log10 of the stars per cell, so 10^7 points stay readable.
     */
    static void hrDiagram(File png, String title, List<double[]> cells, double dx, double dy) throws IOException {
        int n = cells.size();
        double[] xs = new double[n];
        double[] ys = new double[n];
        double[] zs = new double[n];
        double zMax = 1;
        for (int i = 0; i < n; i++) {
            xs[i] = cells.get(i)[0] + dx / 2;
            ys[i] = cells.get(i)[1] + dy / 2;
            zs[i] = Math.log10(cells.get(i)[2]);
            zMax = Math.max(zMax, zs[i]);
        }
        DefaultXYZDataset d = new DefaultXYZDataset();
        d.addSeries("stars", new double[][] {xs, ys, zs});
        NumberAxis x = new KelvinAxis("effective temperature [K] (log scale)");
        x.setInverted(true);
        x.setAutoRangeIncludesZero(false);
        NumberAxis y = new NumberAxis("log10 L / L_sun");
        y.setAutoRangeIncludesZero(false);
        XYBlockRenderer r = new XYBlockRenderer();
        r.setBlockWidth(dx);
        r.setBlockHeight(dy);
        LookupPaintScale scale = new LookupPaintScale(0, zMax + 1e-9, Color.WHITE);
        int steps = 64;
        for (int i = 0; i < steps; i++) {
            float t = i / (float) (steps - 1);
            // light yellow (few stars) to dark blue (many)
            Color c = new Color(1f - 0.85f * t, 1f - 0.75f * t, 0.75f - 0.25f * Math.abs(0.5f - t) + 0.2f * t);
            scale.add(zMax * i / steps, c);
        }
        r.setPaintScale(scale);
        XYPlot p = new XYPlot(d, x, y, r);
        JFreeChart c = new JFreeChart(title, new Font("SansSerif", Font.BOLD, 14), p, false);
        style(c);
        NumberAxis legendAxis = new NumberAxis("log10 stars per cell");
        PaintScaleLegend legend = new PaintScaleLegend(scale, legendAxis);
        legend.setPosition(RectangleEdge.RIGHT);
        legend.setMargin(4, 4, 40, 4);
        c.addSubtitle(legend);
        ChartUtils.saveChartAsPNG(png, c, HR_WIDTH, HR_HEIGHT);
    }

    /** One line per series over categories 0..n−1 (e.g. bias per parallax-S/N bin), with a reference line. */
    static void lines(File png, String title, String xLabel, String yLabel, Map<String, double[]> series,
                      double reference) throws IOException {
        XYSeriesCollection d = new XYSeriesCollection();
        for (Map.Entry<String, double[]> e : series.entrySet()) {
            XYSeries s = new XYSeries(e.getKey());
            for (int i = 0; i < e.getValue().length; i++) {
                if (!Double.isNaN(e.getValue()[i])) {
                    s.add(i, e.getValue()[i]);
                }
            }
            d.addSeries(s);
        }
        XYSeries ref = new XYSeries("reference");
        int len = series.values().iterator().next().length;
        ref.add(-0.2, reference);
        ref.add(len - 0.8, reference);
        d.addSeries(ref);
        NumberAxis x = new NumberAxis(xLabel);
        x.setStandardTickUnits(NumberAxis.createIntegerTickUnits());
        NumberAxis y = new NumberAxis(yLabel);
        y.setAutoRangeIncludesZero(false);
        XYLineAndShapeRenderer r = new XYLineAndShapeRenderer(true, true);
        r.setSeriesPaint(d.getSeriesCount() - 1, Color.GRAY);
        r.setSeriesShapesVisible(d.getSeriesCount() - 1, false);
        r.setSeriesStroke(d.getSeriesCount() - 1, new BasicStroke(1f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 1f, new float[] {4f, 4f}, 0f));
        XYPlot p = new XYPlot(d, x, y, r);
        JFreeChart c = new JFreeChart(title, new Font("SansSerif", Font.BOLD, 14), p, true);
        style(c);
        ChartUtils.saveChartAsPNG(png, c, PLOT_WIDTH, PLOT_HEIGHT);
    }

}
