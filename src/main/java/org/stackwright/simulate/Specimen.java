package org.stackwright.simulate;

import java.util.SplittableRandom;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Invented fluorescent specimens for demos and tests: a cultured-cell-like field with sub-resolution beads, thin
 * curved filaments, hollow vesicles and a dim cytoplasm-like haze. Deterministic for a given seed.
 *
 * <p>Objects are drawn in physical units (micrometres), so the same seed gives the same scene at any voxel size;
 * every object is placed inside the volume.
 */
public final class Specimen {

    /** What to put into the field; counts may be 0. Brightness in photons per voxel at the object's core. */
    public record Contents(int beads, int filaments, int vesicles, double beadPhotons, double filamentPhotons,
            double vesiclePhotons, double hazePhotons) {

        /** A field like a cultured cell: a few beads, a dozen filaments, some vesicles. */
        public static Contents cellField() {
            return new Contents(12, 10, 6, 800, 300, 120, 8);
        }

        /** Only isolated beads (for PSF measurement from beads). */
        public static Contents beadsOnly(int n, double photons) {
            return new Contents(n, 0, 0, photons, 0, 0, 0);
        }
    }

    private Specimen() {
    }

    /**
     * Draws a specimen.
     *
     * @param nx width in voxels
     * @param ny height in voxels
     * @param nz depth in voxels (1 for a 2D field)
     * @param voxel voxel size in micrometres
     * @param contents what to draw
     * @param seed random seed
     * @return the ground truth: expected photons per voxel before blur, non-negative
     */
    public static Volume draw(int nx, int ny, int nz, VoxelSize voxel, Contents contents, long seed) {
        Volume v = Volume.zeros(nx, ny, nz, voxel);
        SplittableRandom rnd = new SplittableRandom(seed);
        double sx = nx * voxel.x();
        double sy = ny * voxel.y();
        double sz = nz * voxel.z();
        if (contents.hazePhotons() > 0) {
            haze(v, contents.hazePhotons(), rnd.split());
        }
        for (int i = 0; i < contents.filaments(); i++) {
            filament(v, rnd.split(), contents.filamentPhotons(), sx, sy, sz);
        }
        for (int i = 0; i < contents.vesicles(); i++) {
            double r = 0.4 + 0.5 * rnd.nextDouble();
            double[] c = inside(rnd, sx, sy, sz, r + 0.3);
            shell(v, c, r, 0.12, contents.vesiclePhotons());
        }
        // A bead slide (beads only) has its beads dried onto the coverslip: one layer in the middle of the stack
        // (sub-voxel jitter of +-0.1 um), 1.2 um or more from the sides, so that a PSF box around most of them fits
        // inside the view; in a cell field beads may lie anywhere.
        boolean beadSlide = contents.filaments() == 0 && contents.vesicles() == 0 && contents.hazePhotons() == 0;
        for (int i = 0; i < contents.beads(); i++) {
            double[] c = beadSlide
                    ? new double[] {uniform(rnd, sx, 1.2), uniform(rnd, sy, 1.2), nz == 1 ? uniform(rnd, sz, 0.5) : sz / 2 + 0.2 * (rnd.nextDouble() - 0.5)}
                    : inside(rnd, sx, sy, sz, 0.5);
            point(v, c, contents.beadPhotons());
        }
        return v;
    }

    private static double[] inside(SplittableRandom rnd, double sx, double sy, double sz, double margin) {
        return new double[] {uniform(rnd, sx, margin), uniform(rnd, sy, margin), uniform(rnd, sz, margin)};
    }

    private static double uniform(SplittableRandom rnd, double extent, double margin) {
        double m = Math.min(margin, extent / 4);
        return m + rnd.nextDouble() * (extent - 2 * m);
    }

    /** A smooth, slowly varying background haze in the middle of the field, like cytoplasm. */
    private static void haze(Volume v, double photons, SplittableRandom rnd) {
        double cx = (0.35 + 0.3 * rnd.nextDouble()) * v.width();
        double cy = (0.35 + 0.3 * rnd.nextDouble()) * v.height();
        double rx = 0.35 * v.width();
        double ry = 0.3 * v.height();
        for (int z = 0; z < v.depth(); z++) {
            double fz = v.depth() == 1 ? 1 : Math.sin(Math.PI * (z + 0.5) / v.depth());
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    double q = sq((x - cx) / rx) + sq((y - cy) / ry);
                    double h = Math.exp(-q * q);
                    v.data()[v.index(x, y, z)] += (float) (photons * h * fz);
                }
            }
        }
    }

    /** A thin curved filament: a smooth random path drawn as a tube of Gaussian cross-section. */
    private static void filament(Volume v, SplittableRandom rnd, double photons, double sx, double sy, double sz) {
        VoxelSize vs = v.voxel();
        double[] p = inside(rnd, sx, sy, sz, 0.3);
        double angle = rnd.nextDouble() * 2 * Math.PI;
        double elevation = v.depth() == 1 ? 0 : (rnd.nextDouble() - 0.5) * 0.6;
        double length = 0.4 * Math.max(sx, sy) * (0.5 + rnd.nextDouble());
        double step = 0.5 * Math.min(vs.x(), vs.y());
        double curvature = (rnd.nextDouble() - 0.5) * 0.6;
        double radius = 0.08; // micrometres: thinner than the resolution
        for (double s = 0; s < length; s += step) {
            addBlob(v, p, radius, photons * step / (radius * 2.5));
            angle += curvature * step;
            p[0] += step * Math.cos(angle) * Math.cos(elevation);
            p[1] += step * Math.sin(angle) * Math.cos(elevation);
            p[2] += step * Math.sin(elevation);
            if (p[0] < 0 || p[1] < 0 || p[0] > sx || p[1] > sy || p[2] < 0 || p[2] > sz) {
                break;
            }
        }
    }

    /** A hollow sphere (vesicle membrane) of radius r and wall thickness t, micrometres. */
    private static void shell(Volume v, double[] c, double r, double t, double photons) {
        VoxelSize vs = v.voxel();
        int x0 = (int) Math.floor((c[0] - r - 2 * t) / vs.x());
        int x1 = (int) Math.ceil((c[0] + r + 2 * t) / vs.x());
        int y0 = (int) Math.floor((c[1] - r - 2 * t) / vs.y());
        int y1 = (int) Math.ceil((c[1] + r + 2 * t) / vs.y());
        int z0 = (int) Math.floor((c[2] - r - 2 * t) / vs.z());
        int z1 = (int) Math.ceil((c[2] + r + 2 * t) / vs.z());
        for (int z = Math.max(0, z0); z <= Math.min(v.depth() - 1, z1); z++) {
            double dz = v.depth() == 1 ? 0 : (z + 0.5) * vs.z() - c[2];
            for (int y = Math.max(0, y0); y <= Math.min(v.height() - 1, y1); y++) {
                double dy = (y + 0.5) * vs.y() - c[1];
                for (int x = Math.max(0, x0); x <= Math.min(v.width() - 1, x1); x++) {
                    double dx = (x + 0.5) * vs.x() - c[0];
                    double d = Math.sqrt(dx * dx + dy * dy + dz * dz) - r;
                    double w = Math.exp(-0.5 * sq(d / t));
                    if (w > 1e-3) {
                        v.data()[v.index(x, y, z)] += (float) (photons * w);
                    }
                }
            }
        }
    }

    /** A point source (sub-resolution bead) shared between the neighbouring voxels by trilinear weights. */
    public static void point(Volume v, double[] c, double photons) {
        VoxelSize vs = v.voxel();
        double fx = c[0] / vs.x() - 0.5;
        double fy = c[1] / vs.y() - 0.5;
        double fz = v.depth() == 1 ? 0 : c[2] / vs.z() - 0.5;
        int ix = (int) Math.floor(fx);
        int iy = (int) Math.floor(fy);
        int iz = (int) Math.floor(fz);
        for (int dz = 0; dz <= 1; dz++) {
            for (int dy = 0; dy <= 1; dy++) {
                for (int dx = 0; dx <= 1; dx++) {
                    int x = ix + dx;
                    int y = iy + dy;
                    int z = iz + dz;
                    if (x < 0 || y < 0 || z < 0 || x >= v.width() || y >= v.height() || z >= v.depth()) {
                        continue;
                    }
                    double w = (dx == 0 ? 1 - (fx - ix) : fx - ix) * (dy == 0 ? 1 - (fy - iy) : fy - iy)
                            * (dz == 0 ? 1 - (fz - iz) : fz - iz);
                    v.data()[v.index(x, y, z)] += (float) (photons * w);
                }
            }
        }
    }

    private static void addBlob(Volume v, double[] c, double sigma, double photons) {
        VoxelSize vs = v.voxel();
        int rx = (int) Math.ceil(3 * sigma / vs.x()) + 1;
        int ry = (int) Math.ceil(3 * sigma / vs.y()) + 1;
        int rz = v.depth() == 1 ? 0 : (int) Math.ceil(3 * sigma / vs.z()) + 1;
        int cx = (int) Math.floor(c[0] / vs.x());
        int cy = (int) Math.floor(c[1] / vs.y());
        int cz = v.depth() == 1 ? 0 : (int) Math.floor(c[2] / vs.z());
        for (int z = Math.max(0, cz - rz); z <= Math.min(v.depth() - 1, cz + rz); z++) {
            double dz = v.depth() == 1 ? 0 : (z + 0.5) * vs.z() - c[2];
            for (int y = Math.max(0, cy - ry); y <= Math.min(v.height() - 1, cy + ry); y++) {
                double dy = (y + 0.5) * vs.y() - c[1];
                for (int x = Math.max(0, cx - rx); x <= Math.min(v.width() - 1, cx + rx); x++) {
                    double dx = (x + 0.5) * vs.x() - c[0];
                    double w = Math.exp(-0.5 * (dx * dx + dy * dy + dz * dz) / (sigma * sigma));
                    v.data()[v.index(x, y, z)] += (float) (photons * w);
                }
            }
        }
    }

    private static double sq(double a) {
        return a * a;
    }
}
