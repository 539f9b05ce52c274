#!/usr/bin/python3
"""Time `reticle peaks` against the SciPy peer script on the same scans.

usage: peer_ratio.py [--bench DIR] [--reticle BIN] [--rounds N]

Runs, for every scan of DIR/truth.json (default ../shared/bench/public),
BIN peaks --json --wavelength W FILE and DIR/../peer_peaks.py --wavelength W
FILE, alternating the two so that both see the same machine load, N rounds
(default 3), and prints the total wall time of each and their ratio. Both
are whole processes, as a user runs them. Standard library only; the peer
needs numpy and scipy.
"""
import argparse, json, os, subprocess, sys, time


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    root = os.path.normpath(os.path.join(here, '..', '..'))
    ap = argparse.ArgumentParser()
    ap.add_argument('--bench', default=os.path.join(root, '..', 'shared', 'bench', 'public'))
    ap.add_argument('--reticle', default=os.path.join(root, 'bin', 'reticle'))
    ap.add_argument('--rounds', type=int, default=3)
    args = ap.parse_args()
    peer = os.path.join(args.bench, '..', 'peer_peaks.py')
    truth = json.load(open(os.path.join(args.bench, 'truth.json')))
    t_ret = t_peer = 0.0
    for _ in range(args.rounds):
        for t in truth:
            w = t['tube'] if t.get('doublet') else t['wavelength']
            path = os.path.join(args.bench, t['file'])
            for cmd, which in (([args.reticle, 'peaks', '--json', '--wavelength', w, path], 'r'),
                               ([sys.executable, peer, '--wavelength', w, path], 'p')):
                s = time.perf_counter()
                r = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
                d = time.perf_counter() - s
                if r.returncode != 0:
                    print(f'{cmd[0]} failed on {path}', file=sys.stderr)
                if which == 'r':
                    t_ret += d
                else:
                    t_peer += d
    n = len(truth) * args.rounds
    print(f'{n} runs each: reticle {1000 * t_ret / n:.1f} ms per scan, peer {1000 * t_peer / n:.1f} ms per scan')
    print(f'ratio reticle/peer = 1/{t_peer / t_ret:.1f}')


if __name__ == '__main__':
    main()
