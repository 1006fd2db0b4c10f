package org.stackwright.model;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Statistics of the camera model on a flat field. Poisson-Gaussian camera (common practice for CCD / sCMOS
 * cameras): mean = offset + gain * photons, variance = gain * mu + sigma^2 where mu = gain * photons is the mean
 * above the offset in ADU and sigma the read noise in ADU. The Poisson part alone: mean = variance = photons
 * (elementary property of the Poisson distribution).
 */
class CameraTest {

    private static final int N = 400_000;

    private static double[] meanVar(float[] d) {
        double m = 0;
        for (float v : d) {
            m += v;
        }
        m /= d.length;
        double s = 0;
        for (float v : d) {
            s += (v - m) * (v - m);
        }
        return new double[] {m, s / (d.length - 1)};
    }

    @ParameterizedTest(name = "{0} photons, gain {1}, read noise {2}")
    @CsvSource({"0.3, 1, 0", "4, 1, 0", "50, 2.5, 3", "800, 0.5, 6", "20, 1.5, 0"})
    void meanAndVarianceFollowThePoissonGaussianModel(double photons, double gain, double read) {
        float[] mu = new float[N];
        Arrays.fill(mu, (float) photons);
        Volume flat = new Volume(N, 1, 1, mu, VoxelSize.UNIT);
        double offset = 100;
        Volume rec = new Camera(gain, offset, read, Double.POSITIVE_INFINITY).record(flat, 42);
        double[] mv = meanVar(rec.data());
        double aboveOffset = gain * photons;
        double variance = gain * aboveOffset + read * read;
        // sampling error of N samples: mean to sqrt(var/N), variance to about var*sqrt(2/N) (plus the Poisson
        // excess kurtosis 1/photons): allow 5 standard errors
        double seMean = Math.sqrt(variance / N);
        double seVar = variance * Math.sqrt((2 + gain * gain * gain * gain * photons / (variance * variance)) / N);
        assertEquals(offset + aboveOffset, mv[0], 5 * seMean, "mean");
        assertEquals(variance, mv[1], 5 * seVar, "variance = gain * mu + sigma^2");
        assertArrayEquals(mu, flat.data(), "the expected image is not modified");
    }

    @Test
    void sameSeedSameImageAndSaturationClips() {
        float[] mu = new float[1000];
        for (int i = 0; i < mu.length; i++) {
            mu[i] = i * 0.5f;
        }
        Volume v = new Volume(1000, 1, 1, mu, VoxelSize.UNIT);
        Camera cam = new Camera(2, 100, 2, 400);
        assertArrayEquals(cam.record(v, 9).data(), cam.record(v, 9).data());
        float max = 0;
        for (float x : cam.record(v, 9).data()) {
            max = Math.max(max, x);
        }
        assertEquals(400f, max, "values above full scale are clipped to it");
        assertTrue(!Arrays.equals(cam.record(v, 9).data(), cam.record(v, 10).data()), "the seed matters");
    }

    @Test
    void badSettingsAreRefused() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new Camera(0, 100, 1, 1e4));
        assertTrue(e.getMessage().contains("gain"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> new Camera(1, 100, -1, 1e4));
        assertTrue(e.getMessage().contains("read noise"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> new Camera(1, 100, 1, 50));
        assertTrue(e.getMessage().contains("full scale") && e.getMessage().contains("offset"), e.getMessage());
    }
}
