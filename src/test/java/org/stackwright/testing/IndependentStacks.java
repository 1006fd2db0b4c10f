package org.stackwright.testing;

import java.util.SplittableRandom;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Invented camera stacks from a generator independent of the project's simulator: its own object (beads or
 * cells), its own sampled Gaussian PSF, a direct (non-FFT) periodic blur, its own Poisson and Gaussian samplers.
 * Used where an automatic choice or a numerical property must be checked on data the project did not make.
 */
public final class IndependentStacks {

    /**
     * @param seed random seed (fixed: the same stack every run)
     * @param w width
     * @param h height
     * @param d depth (1 for a 2D image)
     * @param photons mean photons per voxel of the blurred object
     * @param sparse beads (a few points on a dark field) instead of cells (blobs on a faint floor)
     * @param backgroundPhotons uniform background per voxel
     * @param offset camera offset, ADU
     * @param gain ADU per photo-electron
     * @param readNoise ADU
     * @param sigmaXy PSF sigma in x and y, voxels
     * @param sigmaZ PSF sigma in z, voxels (unused when pd = 1)
     * @param pw PSF width and height, odd
     * @param pd PSF depth, odd
     */
    public record Spec(long seed, int w, int h, int d, double photons, boolean sparse, double backgroundPhotons,
            double offset, double gain, double readNoise, double sigmaXy, double sigmaZ, int pw, int pd) {
    }

    private IndependentStacks() {
    }

    /**
     * The independent generator: an object of beads (sparse: a few points of random brightness on a dark field)
     * or cells (dense: Gaussian blobs on a faint floor) scaled to the case's mean photons per voxel, blurred by a
     * sampled Gaussian PSF with periodic wrap (direct sum, no FFT), plus background photons, recorded with Poisson
     * noise, gain, offset and Gaussian read noise.
     *
     * @return {data in ADU, PSF}
     */
    public static Volume[] generate(Spec c) {
        SplittableRandom r = new SplittableRandom(c.seed() * 31 + 7);
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.25);
        int w = c.w();
        int h = c.h();
        int d = c.d();
        double[] obj = new double[w * h * d];
        if (c.sparse()) {
            int beads = 1 + r.nextInt(6);
            for (int b = 0; b < beads; b++) {
                obj[(r.nextInt(d) * h + r.nextInt(h)) * w + r.nextInt(w)] += r.nextDouble(0.2, 1);
            }
        } else {
            java.util.Arrays.fill(obj, 0.02);
            int blobs = 2 + r.nextInt(6);
            for (int b = 0; b < blobs; b++) {
                double cx = r.nextDouble(w);
                double cy = r.nextDouble(h);
                double cz = r.nextDouble(d);
                double rad = r.nextDouble(1, 4);
                double a = r.nextDouble(0.3, 1);
                for (int z = 0; z < d; z++) {
                    for (int y = 0; y < h; y++) {
                        for (int x = 0; x < w; x++) {
                            double q = ((x - cx) * (x - cx) + (y - cy) * (y - cy) + (z - cz) * (z - cz)) / (rad * rad);
                            obj[(z * h + y) * w + x] += a * Math.exp(-q);
                        }
                    }
                }
            }
        }
        int pw = c.pw();
        int pd = c.pd();
        double[] k = new double[pw * pw * pd];
        double ks = 0;
        for (int z = 0; z < pd; z++) {
            for (int y = 0; y < pw; y++) {
                for (int x = 0; x < pw; x++) {
                    double dx = x - pw / 2;
                    double dy = y - pw / 2;
                    double dz = z - pd / 2;
                    double e = (dx * dx + dy * dy) / (2 * c.sigmaXy() * c.sigmaXy())
                            + (pd == 1 ? 0 : dz * dz / (2 * c.sigmaZ() * c.sigmaZ()));
                    k[(z * pw + y) * pw + x] = Math.exp(-e);
                    ks += k[(z * pw + y) * pw + x];
                }
            }
        }
        float[] psf = new float[k.length];
        for (int i = 0; i < k.length; i++) {
            k[i] /= ks;
            psf[i] = (float) k[i];
        }
        double[] blur = new double[obj.length];
        double mean = 0;
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double o = obj[(z * h + y) * w + x];
                    if (o == 0) {
                        continue;
                    }
                    for (int kz = 0; kz < pd; kz++) {
                        int tz = Math.floorMod(z + kz - pd / 2, d);
                        for (int ky = 0; ky < pw; ky++) {
                            int ty = Math.floorMod(y + ky - pw / 2, h);
                            for (int kx = 0; kx < pw; kx++) {
                                int tx = Math.floorMod(x + kx - pw / 2, w);
                                blur[(tz * h + ty) * w + tx] += o * k[(kz * pw + ky) * pw + kx];
                            }
                        }
                    }
                }
            }
        }
        for (double v : blur) {
            mean += v;
        }
        double scale = c.photons() / (mean / blur.length);
        float[] adu = new float[blur.length];
        for (int i = 0; i < blur.length; i++) {
            double photons = poisson(r, blur[i] * scale + c.backgroundPhotons());
            adu[i] = (float) (c.offset() + c.gain() * photons + c.readNoise() * r.nextGaussian());
        }
        return new Volume[] {new Volume(w, h, d, adu, voxel), new Volume(pw, pw, pd, psf, voxel)};
    }

    /** Poisson sample: Knuth's product of uniforms below a mean of 30, else the normal approximation, rounded. */
    public static double poisson(SplittableRandom r, double mean) {
        if (mean <= 0) {
            return 0;
        }
        if (mean < 30) {
            double l = Math.exp(-mean);
            int n = 0;
            double p = r.nextDouble();
            while (p > l) {
                n++;
                p *= r.nextDouble();
            }
            return n;
        }
        return Math.max(0, Math.rint(mean + Math.sqrt(mean) * r.nextGaussian()));
    }
}
