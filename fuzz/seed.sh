#!/usr/bin/env bash
# Seeds the fuzz corpora from the project's own books: every workbook fixture
# for book_reader, and every CSV folder (files joined by 0x1E in the order
# the target splits them) for csv_reader. Run from fuzz/.
set -euo pipefail
cd "$(dirname "$0")"
root=..
mkdir -p corpus/book_reader corpus/csv_reader
for f in "$root"/tests/fixtures/books/*.{xlsx,xls,ods,XLSX,book} \
         "$root"/tests/bad-books/*.{xlsx,xls} "$root"/sample-books/*.xlsx; do
  [ -f "$f" ] && cp "$f" "corpus/book_reader/$(basename "$f")"
done
for d in "$root"/tests/fixtures/books/*_csv "$root"/tests/bad-books/*_csv "$root"/sample-books/*-csv; do
  [ -d "$d" ] || continue
  out="corpus/csv_reader/$(basename "$d")"
  : > "$out"
  first=1
  for name in accounts rates movements statements settings holidays; do
    [ $first = 1 ] || printf '\x1e' >> "$out"
    first=0
    [ -f "$d/$name.csv" ] && cat "$d/$name.csv" >> "$out"
  done
done
ls corpus/book_reader | wc -l
ls corpus/csv_reader | wc -l
