package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * PSF from beads on an invented bead stack made with a known PSF (the widefield model): 20 beads at random
 * sub-voxel positions, Poisson photon noise and camera read noise, with two close pairs and one saturated bead
 * planted. The recovered PSF must match the known one (normalised L2 difference <= 5 %, FWHMs within 5 %) and
 * the planted bad beads must be rejected with their reason (acceptance values of the project issue).
 */
class PsfFromBeadsTest extends TwoWorkers {

    static final VoxelSize VOXEL = new VoxelSize(0.08, 0.08, 0.2);
    static final int FINE = 3;
    static final int BOX_X = 21;
    static final int BOX_Z = 15;

    /** A planted bead: centre in voxels, photons, and what it is. */
    record Planted(double x, double y, double z, double photons, String kind) {
    }

    static Volume fine;
    static Volume truth;
    static List<Planted> planted;
    static Volume stack;

    @BeforeAll
    static void makeStack() {
        // the known PSF on a 3x finer grid, so beads can sit at thirds of a voxel
        fine = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD).compute(PsfSettings.matched(1.2, 520, 1.33,
                new VoxelSize(VOXEL.x() / FINE, VOXEL.y() / FINE, VOXEL.z() / FINE), 41 * FINE, 41 * FINE, 25 * FINE),
                workers);
        Volume binned = bin(0, 0, 0);
        truth = Padding.crop(binned, 20 - BOX_X / 2, 20 - BOX_X / 2, 12 - BOX_Z / 2, BOX_X, BOX_X, BOX_Z);
        normalise(truth);
        // 20 beads on a jittered 5 x 4 grid (40 voxels apart; two slots left empty): 15 single beads, two close
        // pairs 8 voxels (0.64 um) apart, and one bead 20 times brighter that the 12-bit camera clips. Each bead
        // gives 200 000 photons (about 1800 in the brightest voxel) over a background of 20 photons per voxel; the
        // stack reaches well above and below the beads, as a bead stack should, so the background can be measured.
        SplittableRandom r = new SplittableRandom(7);
        planted = new ArrayList<>();
        int slot = 0;
        for (int row = 0; row < 4; row++) {
            for (int col = 0; col < 5; col++, slot++) {
                if (slot == 7 || slot == 13) {
                    continue;
                }
                int x = 22 + 40 * col + r.nextInt(-3, 4);
                int y = 22 + 40 * row + r.nextInt(-3, 4);
                int z = 30 + r.nextInt(-2, 3);
                String kind = slot == 4 || slot == 11 ? "pair" : slot == 17 ? "saturated" : "single";
                double photons = kind.equals("saturated") ? 20 * 200_000 : 200_000;
                planted.add(new Planted(x + r.nextInt(-1, 2) / 3.0, y + r.nextInt(-1, 2) / 3.0,
                        z + r.nextInt(-1, 2) / 3.0, photons, kind));
                if (kind.equals("pair")) {
                    planted.add(new Planted(x + 8 + r.nextInt(-1, 2) / 3.0, y + 1 / 3.0, z, 200_000, kind));
                }
            }
        }
        Volume expected = Volume.zeros(212, 160, 61, VOXEL);
        for (Planted p : planted) {
            add(expected, p);
        }
        float[] e = expected.data();
        for (int i = 0; i < e.length; i++) {
            e[i] += 20;
        }
        // 12-bit camera: gain 1, offset 100 ADU, read noise 2 ADU, full scale 4095 (clips the bright bead)
        stack = new Camera(1, 100, 2, 4095).record(expected, 11);
    }

    /** The fine PSF binned 3x3x3 with the bead displaced by (sx, sy, sz) thirds of a voxel, 41x41x25. */
    static Volume bin(int sx, int sy, int sz) {
        Volume out = Volume.zeros(41, 41, 25, VOXEL);
        for (int z = 0; z < 25; z++) {
            for (int y = 0; y < 41; y++) {
                for (int x = 0; x < 41; x++) {
                    double s = 0;
                    for (int c = -1; c <= 1; c++) {
                        for (int b = -1; b <= 1; b++) {
                            for (int a = -1; a <= 1; a++) {
                                int fx = FINE * x + 1 + a - sx;
                                int fy = FINE * y + 1 + b - sy;
                                int fz = FINE * z + 1 + c - sz;
                                if (fx >= 0 && fy >= 0 && fz >= 0 && fx < fine.width() && fy < fine.height()
                                        && fz < fine.depth()) {
                                    s += fine.get(fx, fy, fz);
                                }
                            }
                        }
                    }
                    out.set(x, y, z, (float) s);
                }
            }
        }
        return out;
    }

    static void add(Volume expected, Planted p) {
        int cx = (int) Math.round(p.x());
        int cy = (int) Math.round(p.y());
        int cz = (int) Math.round(p.z());
        Volume image = bin((int) Math.round((p.x() - cx) * FINE), (int) Math.round((p.y() - cy) * FINE),
                (int) Math.round((p.z() - cz) * FINE));
        for (int z = 0; z < 25; z++) {
            for (int y = 0; y < 41; y++) {
                for (int x = 0; x < 41; x++) {
                    int tx = cx + x - 20;
                    int ty = cy + y - 20;
                    int tz = cz + z - 12;
                    if (tx >= 0 && ty >= 0 && tz >= 0 && tx < expected.width() && ty < expected.height()
                            && tz < expected.depth()) {
                        int i = expected.index(tx, ty, tz);
                        expected.data()[i] += (float) (p.photons() * image.get(x, y, z));
                    }
                }
            }
        }
    }

    static void normalise(Volume v) {
        double s = v.sum();
        float[] d = v.data();
        for (int i = 0; i < d.length; i++) {
            d[i] /= (float) s;
        }
    }

    @Test
    void recoversTheKnownPsfAndRejectsThePlantedBadBeads() {
        float[] before = stack.data().clone();
        PsfFromBeads.Outcome out = PsfFromBeads.run(stack, BOX_X, BOX_X, BOX_Z, 0, Double.NaN, workers);
        assertTrue(java.util.Arrays.equals(before, stack.data()), "the input stack must not change");
        assertEquals(20, planted.size());
        assertEquals(20, out.beads().size(), "beads found: " + out.beads());
        for (Bead b : out.beads()) {
            Planted p = nearest(b);
            switch (p.kind()) {
                case "pair" -> {
                    assertFalse(b.used(), "bead of a close pair used: " + b);
                    assertTrue(b.reason().startsWith("close pair"), b.reason());
                }
                case "saturated" -> {
                    assertFalse(b.used(), "saturated bead used: " + b);
                    assertTrue(b.reason().startsWith("saturated"), b.reason());
                }
                default -> {
                    assertTrue(b.used(), "single bead rejected: " + b);
                    // localisation to a fraction of a voxel (the Gaussian centre of this symmetric PSF)
                    assertEquals(p.x(), b.x(), 0.15, "x of " + b);
                    assertEquals(p.y(), b.y(), 0.15, "y of " + b);
                    assertEquals(p.z(), b.z(), 0.25, "z of " + b);
                }
            }
        }
        assertEquals(15, out.used());
        Volume psf = out.psf();
        assertEquals(1.0, psf.sum(), 1e-5);
        assertEquals(psf.max(), psf.get(BOX_X / 2, BOX_X / 2, BOX_Z / 2), 0f);
        double l2 = ConfocalPsfTest.normalisedL2(truth, psf);
        assertTrue(l2 <= 0.05, "normalised L2 difference to the known PSF " + l2);
        Fwhm.Widths known = Fwhm.measure(truth);
        Fwhm.Widths got = out.fwhm();
        assertEquals(known.xUm(), got.xUm(), 0.05 * known.xUm(), "FWHM x");
        assertEquals(known.yUm(), got.yUm(), 0.05 * known.yUm(), "FWHM y");
        assertEquals(known.zUm(), got.zUm(), 0.05 * known.zUm(), "FWHM z");
    }

    private static Planted nearest(Bead b) {
        Planted best = null;
        double d = Double.MAX_VALUE;
        for (Planted p : planted) {
            double e = Math.pow(p.x() - b.x(), 2) + Math.pow(p.y() - b.y(), 2) + Math.pow(p.z() - b.z(), 2);
            if (e < d) {
                d = e;
                best = p;
            }
        }
        assertTrue(d < 4, "bead " + b + " is not near any planted bead");
        return best;
    }
}
