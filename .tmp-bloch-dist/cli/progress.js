export function progressBar(enabled) {
    const on = enabled && process.stderr.isTTY === true;
    let last = -1;
    return {
        update(label, fraction) {
            if (!on)
                return;
            const pct = Math.floor(fraction * 100);
            if (pct === last)
                return;
            last = pct;
            const width = 30;
            const n = Math.round(fraction * width);
            process.stderr.write(`\r${label} [${'#'.repeat(n)}${'.'.repeat(width - n)}] ${String(pct).padStart(3)}%`);
        },
        done() {
            if (on)
                process.stderr.write('\r\x1b[K');
        },
    };
}
