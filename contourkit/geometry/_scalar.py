"""Scalar (pure-Python complex) evaluation of Phi, Phi', Phi'' for path tracing.

The tracer works one point at a time; numpy's per-call overhead dominates
there, so the same formulas as phase.py are evaluated with Python complex
numbers (Horner's rule, cmath.log).
"""
import cmath


class ScalarPhase:
    """Phi(k) = i k x + Q(k) + sum_j [nu_j L_j + sum_p c_jp (k - k_j)^-p] at scalar k."""

    def __init__(self, rep, x):
        self.x = complex(x)
        self.Q = [complex(c) for c in rep._Q]
        self.Qp = [complex(c) for c in rep._Qp] if len(rep._Q) > 1 else [0j]
        n = len(self.Qp) - 1
        self.Qpp = [self.Qp[i] * (n - i) for i in range(n)] if n > 0 else [0j]
        self.kj = [complex(c) for c in rep._kj]
        self.nu = [complex(c) for c in rep._nu]
        self.ess = [[complex(c) for c in e] for e in rep._ess]
        self.J = len(self.kj)

    @staticmethod
    def _horner(c, k):
        v = 0j
        for a in c:
            v = v * k + a
        return v

    def phi(self, k, logs):
        v = 1j * self.x * k + self._horner(self.Q, k)
        for j in range(self.J):
            v += self.nu[j] * logs[j]
            if self.ess[j]:
                z = k - self.kj[j]
                for p, c in enumerate(self.ess[j], start=1):
                    v += c * z ** (-p)
        return v

    def d1(self, k):
        v = 1j * self.x + self._horner(self.Qp, k)
        for j in range(self.J):
            z = k - self.kj[j]
            v += self.nu[j] / z
            for p, c in enumerate(self.ess[j], start=1):
                v -= p * c * z ** (-p - 1)
        return v

    def d2(self, k):
        v = self._horner(self.Qpp, k)
        for j in range(self.J):
            z = k - self.kj[j]
            v -= self.nu[j] / (z * z)
            for p, c in enumerate(self.ess[j], start=1):
                v += p * (p + 1) * c * z ** (-p - 2)
        return v

    def continue_logs(self, k_from, logs, k_to):
        return [logs[j] + cmath.log((k_to - self.kj[j]) / (k_from - self.kj[j])) for j in range(self.J)]

    def nearest_singular(self, k):
        """(distance, index) of the nearest singular point, (inf, -1) if none."""
        best, jb = float("inf"), -1
        for j, kj in enumerate(self.kj):
            d = abs(k - kj)
            if d < best:
                best, jb = d, j
        return best, jb
