package org.stackwright.fft;

import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.stackwright.parallel.Workers;
import org.stackwright.testing.ReferenceFiles;
import org.stackwright.testing.VolumeAssert;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * FFT convolution and correlation against SciPy 1.10.1 on awkward sizes (1, primes, non powers of two, a kernel
 * larger than the image): zero boundary against scipy.signal.fftconvolve(mode='same') and
 * scipy.signal.correlate(mode='same'); periodic boundary against scipy.ndimage.convolve(mode='wrap') (or a direct
 * periodic sum where the kernel is larger than the image). References made by
 * tools/reference/make_fft_references.py; see src/test/resources/reference/README.md.
 */
class ScipyConvolutionReferenceTest {

    /** Max error relative to the largest reference value (the bound for float computation). */
    private static final double TOLERANCE = 1e-5;

    static Stream<String[]> cases() {
        List<String[]> rows = ReferenceFiles.table("fft/cases.txt");
        return rows.stream();
    }

    private static Volume load(String file, int nx, int ny, int nz) {
        return new Volume(nx, ny, nz, ReferenceFiles.floats("fft/" + file, nx * ny * nz), VoxelSize.UNIT);
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void matchesScipy(String name, String nx, String ny, String nz, String kx, String ky, String kz, String periodic) {
        int[] n = {Integer.parseInt(nx), Integer.parseInt(ny), Integer.parseInt(nz)};
        int[] k = {Integer.parseInt(kx), Integer.parseInt(ky), Integer.parseInt(kz)};
        Volume image = load(name + "-image.raw", n[0], n[1], n[2]);
        Volume kernel = load(name + "-kernel.raw", k[0], k[1], k[2]);
        Volume imageBefore = image.copy();
        try (Workers w = new Workers(2)) {
            // scipy.signal.fftconvolve(image, kernel, mode='same'), SciPy 1.10.1
            VolumeAssert.assertClose(load(name + "-same.raw", n[0], n[1], n[2]),
                    Convolution.apply(image, kernel, Convolution.Boundary.ZERO, false, w), TOLERANCE,
                    name + ": zero boundary vs scipy.signal.fftconvolve 'same'");
            // scipy.signal.correlate(image, kernel, mode='same', method='fft'), SciPy 1.10.1
            VolumeAssert.assertClose(load(name + "-corr.raw", n[0], n[1], n[2]),
                    Convolution.apply(image, kernel, Convolution.Boundary.ZERO, true, w), TOLERANCE,
                    name + ": zero-boundary correlation vs scipy.signal.correlate 'same'");
            if (periodic.equals("1")) {
                // scipy.ndimage.convolve(image, kernel, mode='wrap'), SciPy 1.10.1
                VolumeAssert.assertClose(load(name + "-wrap.raw", n[0], n[1], n[2]),
                        Convolution.apply(image, kernel, Convolution.Boundary.PERIODIC, false, w), TOLERANCE,
                        name + ": periodic vs scipy.ndimage.convolve mode='wrap'");
            }
        }
        VolumeAssert.assertClose(imageBefore, image, 0, name + ": input must not be modified");
    }
}
