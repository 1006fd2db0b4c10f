package org.stackwright.repair;

import java.util.List;

import org.stackwright.volume.Volume;

/**
 * Tile gains from every pixel of each tile instead of strips beside the seams: the gain of a tile is its background
 * level after the shading is divided out ({@link TileShading#estimateWithLevels}), relative to the other tiles. Each
 * level pools hundreds of blocks, so it is far less noisy than the few lines beside a seam, and it does not depend on
 * the shading at the tile borders, where the polynomial is least sure; but it holds only when all tiles share one
 * background (the specimen only adds to it). Tissue that covers some tiles and not others, or a background that
 * changes across the mosaic, breaks it, while the seam ratios ({@link TileLevelling}), which compare the two sides of
 * each seam, still hold locally. So the levels are checked against the seams: the root mean square misfit of the
 * measured seam ratios against the ratios the levels predict must stay within {@link #AGREEMENT}. Otherwise nothing
 * of the levels is used: neither for the gains (the seam gains are kept) nor for the shading (the first estimate,
 * with each tile's median as its level). The check is only as sharp as the seams: their own errors (a few per cent
 * under a specimen, more at low light) leave a misfit of 1-3 % where the levels are right, and tissue only 10 %
 * brighter than the rest leaves about as much (README, MosaicShadingTest).
 */
final class BackgroundGains {

    /**
     * rms misfit (log units) of the seam ratios against the background levels above which the levels are not used.
     * Measured with MosaicShadingTest's generator (10 seeds each): 0.5-2.7 % where all tiles share a background of
     * 1000 photons, 1.0-5.0 % at 300, 2.5-7.8 % at 60; where tissue brighter than the rest covers part of the mosaic,
     * 3.7-8.8 % at 1.1 times (the levels are then still no worse than the seams), 7.2-10.2 % at 1.2 times (the levels
     * are worse), 27-34 % at 2 times. Our choice between those, no published value.
     */
    static final double AGREEMENT = 0.06;

    /**
     * @param flat the shading to divide out
     * @param corrected the image with that shading divided out
     * @param gains the gains used
     * @param fromLevels whether they are the background levels (else the seam gains)
     * @param levelMisfit rms misfit of the seam ratios against the background levels, log units (NaN when the levels
     *     could not be measured)
     */
    record Choice(TileShading.Flat flat, Volume corrected, TileLevelling.Gains gains, boolean fromLevels,
            double levelMisfit) {
    }

    private BackgroundGains() {
    }

    /**
     * The shading and gains of {@code seam-mask --level-tiles}.
     *
     * @param image the stitched image, not modified
     * @param strip pixels on each side of a seam for the seam ratios
     */
    static Choice estimate(Volume image, List<int[]> columnBands, List<int[]> rowBands, int strip, double offset) {
        TileShading.Estimate est = TileShading.estimateWithLevels(image, columnBands, rowBands, offset);
        Volume corrected = TileShading.apply(image, columnBands, rowBands, est.flat(), offset);
        TileLevelling.Gains seams = TileLevelling.estimate(corrected, columnBands, rowBands, strip, offset);
        double[] levels = est.logLevels();
        double mean = 0;
        for (double l : levels) {
            mean += l / levels.length;
        }
        double misfit = Double.isNaN(mean) ? Double.NaN : TileLevelling.misfit(seams.ratios(), levels);
        if (misfit <= AGREEMENT) {
            double[] g = new double[levels.length];
            for (int k = 0; k < g.length; k++) {
                g[k] = Math.exp(levels[k] - mean);
            }
            return new Choice(est.flat(), corrected, new TileLevelling.Gains(seams.rows(), seams.columns(), g,
                    seams.pairs(), seams.rmsLogResidual(), seams.ratios()), true, misfit);
        }
        Volume byMedian = TileShading.apply(image, columnBands, rowBands, est.medianFlat(), offset);
        return new Choice(est.medianFlat(), byMedian, TileLevelling.estimate(byMedian, columnBands, rowBands, strip,
                offset), false, misfit);
    }
}
