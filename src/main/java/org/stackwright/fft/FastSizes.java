package org.stackwright.fft;

/**
 * Transform sizes that the FFT handles fast: products of the small primes 2, 3 and 5 (mixed-radix butterflies);
 * other sizes fall back to Bluestein's algorithm, which costs several times more.
 */
public final class FastSizes {

    private FastSizes() {
    }

    /** @return the smallest n' >= n of the form 2^a 3^b 5^c (n itself for n <= 1) */
    public static int atLeast(int n) {
        if (n <= 1) {
            return 1;
        }
        int m = n;
        while (!isFast(m)) {
            m++;
        }
        return m;
    }

    /** @return true when n has no prime factor other than 2, 3 and 5 */
    public static boolean isFast(int n) {
        if (n < 1) {
            return false;
        }
        for (int p : new int[] {2, 3, 5}) {
            while (n % p == 0) {
                n /= p;
            }
        }
        return n == 1;
    }
}
