/**
 * CSV text per RFC 4180: comma-separated fields, CRLF after every record
 * (header included), a field is enclosed in double quotes when it contains a
 * comma, a double quote, CR or LF, and a double quote inside a quoted field
 * is doubled. Fields with leading or trailing spaces are quoted too, since
 * some readers trim unquoted spaces although RFC 4180 keeps them.
 *
 * Numbers are written with the shortest decimal text that reads back to the
 * same double (ECMAScript Number::toString), so no digits are lost. NaN and
 * infinities are refused: write an empty string for a missing value.
 */
function quoteIfNeeded(s) {
    if (/[",\r\n]/.test(s) || /^\s|\s$/.test(s))
        return `"${s.replace(/"/g, '""')}"`;
    return s;
}
function cellText(v, row, col) {
    if (typeof v === 'number') {
        if (!Number.isFinite(v))
            throw new RangeError(`toCsv: row ${row}, column ${col} is ${v}; use '' for a missing value.`);
        return String(v); // shortest round-trip text; -0 becomes "0"
    }
    return quoteIfNeeded(v);
}
/** A table as RFC 4180 CSV text; every row must have as many cells as the header. */
export function toCsv(header, rows) {
    if (header.length === 0)
        throw new RangeError('toCsv: the header has no columns.');
    // a record that is one empty field would be a blank line, which readers skip
    const record = (cells, row) => {
        const text = cells.map((v, c) => cellText(v, row, c)).join(',');
        return text === '' ? '""' : text;
    };
    const lines = [record(header, 0)];
    rows.forEach((r, i) => {
        if (r.length !== header.length) {
            throw new RangeError(`toCsv: row ${i + 1} has ${r.length} cells, the header ${header.length}.`);
        }
        lines.push(record(r, i + 1));
    });
    return lines.join('\r\n') + '\r\n';
}
