#!/usr/bin/env python3
"""Sanity check + simple baselines for the demo corpus (independent of seedsort itself).

Reads corpora_demo/documents/ roughly the way seedsort does (email: subject + body, quoted
reply chain and signature trimmed; mbox messages; CSV rows = subject + description; notes as
text; HTML tags stripped), then:
  1. checks seeds.csv / answer_key.csv against the documents;
  2. prints accuracy on answer_key.csv of (a) logistic regression (C=10) on TF-IDF word 1-2gram
     + char_wb 2-5gram fitted on the seeds only and (b) 1-nearest-seed cosine.

    python corpora_demo/check_baseline.py
"""

from __future__ import annotations

import csv
import email
import email.policy
import html
import mailbox
import re
import sys
from collections import Counter
from pathlib import Path

HERE = Path(__file__).resolve().parent
DOCS = HERE / "documents"

QUOTE_HEAD = re.compile(r"^\s*(On .{0,200} wrote:|-----\s*Original Message\s*-----)\s*$", re.I)
SIGNOFF = re.compile(r"^\s*(thanks|thank you|many thanks|best regards|kind regards|regards|cheers|"
                     r"best wishes|best|ta)\s*[,!.]?\s*$", re.I)


def html_to_text(s: str) -> str:
    s = re.sub(r"(?is)<(script|style|title).*?</\1>", " ", s)
    s = re.sub(r"(?i)<br\s*/?>|</p>|</li>|</h\d>", "\n", s)
    s = re.sub(r"<[^>]+>", " ", s)
    return html.unescape(s)


def trim_reply(body: str) -> str:
    lines = body.splitlines()
    out: list[str] = []
    for i, ln in enumerate(lines):
        if QUOTE_HEAD.match(ln):
            break
        if ln.startswith(">") and i + 1 < len(lines) and lines[i + 1].startswith(">"):
            break
        out.append(ln)
    # signature
    for i, ln in enumerate(out):
        if ln == "-- " or ln.strip() == "--":
            out = out[:i]
            break
        if SIGNOFF.match(ln):
            rest = [x for x in out[i + 1:] if x.strip()]
            if len(rest) <= 5 and all(len(x) < 60 for x in rest):
                out = out[:i]
                break
    return "\n".join(out).strip()


def email_text(msg) -> str:
    subj = str(msg.get("Subject", "") or "")
    part = msg.get_body(("plain", "html"))
    body = ""
    if part is not None:
        body = part.get_content()
        if part.get_content_subtype() == "html":
            body = html_to_text(body)
    return (subj + "\n" + trim_reply(body)).strip()


def read_docs() -> dict[str, str]:
    docs: dict[str, str] = {}
    for p in sorted(DOCS.rglob("*")):
        if not p.is_file():
            continue
        rel = p.relative_to(DOCS).as_posix()
        if p.suffix == ".eml":
            docs[rel] = email_text(email.message_from_bytes(p.read_bytes(), policy=email.policy.default))
        elif p.suffix == ".mbox":
            box = mailbox.mbox(str(p), factory=lambda f: email.message_from_binary_file(f, policy=email.policy.default))
            for n, msg in enumerate(box, start=1):
                docs[f"{rel}#message-{n}"] = email_text(msg)
        elif p.suffix == ".csv":
            with open(p, newline="", encoding="utf-8") as f:
                for row in csv.DictReader(f):
                    docs[f"{rel}#{row['ticket_id']}"] = (row["subject"] + "\n" + row["description"]).strip()
        elif p.suffix in (".html", ".htm"):
            docs[rel] = html_to_text(p.read_text(encoding="utf-8")).strip()
        else:
            docs[rel] = p.read_text(encoding="utf-8").strip()
    return docs


def read_labels(path: Path) -> dict[str, str]:
    with open(path, newline="", encoding="utf-8") as f:
        return {r["document"]: r["category"] for r in csv.DictReader(f)}


def main() -> int:
    docs = read_docs()
    seeds, key = read_labels(HERE / "seeds.csv"), read_labels(HERE / "answer_key.csv")
    problems = []
    for d in list(seeds) + list(key):
        if d not in docs:
            problems.append(f"unknown id {d}")
    if set(seeds) & set(key):
        problems.append(f"in both: {sorted(set(seeds) & set(key))}")
    nonempty = {d for d, t in docs.items() if t.strip()}
    empty = sorted(set(docs) - nonempty)
    missing = nonempty - set(seeds) - set(key)
    if missing:
        problems.append(f"unlabelled non-empty docs: {sorted(missing)}")
    if set(empty) & (set(seeds) | set(key)):
        problems.append("empty doc labelled")
    per = Counter(seeds.values())
    if any(v != 5 for v in per.values()):
        problems.append(f"seed counts {per}")
    print(f"documents: {len(docs)} ({len(nonempty)} non-empty; empty: {empty})")
    fmt = Counter(("mbox" if "#message" in d else "csv" if ".csv#" in d else d.rsplit(".", 1)[1]) for d in docs)
    print("formats:", dict(fmt))
    allc = Counter(seeds.values()) + Counter(key.values())
    print("per category (seeds+key):", dict(sorted(allc.items())))
    dups = Counter(docs[d] for d in nonempty)
    print("exact duplicate texts:", sum(1 for v in dups.values() if v > 1))
    print("problems:", problems or "none")

    from scipy.sparse import hstack
    from sklearn.feature_extraction.text import TfidfVectorizer
    from sklearn.linear_model import LogisticRegression
    from sklearn.preprocessing import normalize

    ids = sorted(nonempty)
    texts = [docs[d] for d in ids]
    wv = TfidfVectorizer(ngram_range=(1, 2), sublinear_tf=True, lowercase=True)
    cv = TfidfVectorizer(analyzer="char_wb", ngram_range=(2, 5), sublinear_tf=True, lowercase=True)
    X = normalize(hstack([wv.fit_transform(texts), cv.fit_transform(texts)]).tocsr())
    idx = {d: i for i, d in enumerate(ids)}
    s_ids = list(seeds)
    k_ids = list(key)
    Xs, ys = X[[idx[d] for d in s_ids]], [seeds[d] for d in s_ids]
    Xk, yk = X[[idx[d] for d in k_ids]], [key[d] for d in k_ids]
    lr = LogisticRegression(C=10, max_iter=5000).fit(Xs, ys)
    pred = lr.predict(Xk)
    acc_lr = sum(p == y for p, y in zip(pred, yk)) / len(yk)
    sims = (Xk @ Xs.T).toarray()
    nn = [ys[j] for j in sims.argmax(axis=1)]
    acc_nn = sum(p == y for p, y in zip(nn, yk)) / len(yk)
    print(f"(a) logistic regression on seeds: {acc_lr:.3f}")
    print(f"(b) 1-nearest seed (cosine):      {acc_nn:.3f}")
    if "-v" in sys.argv:
        conf = Counter((y, p) for p, y in zip(pred, yk) if p != y)
        for (y, p), n in conf.most_common():
            print(f"   {y:>26} -> {p:<26} {n}")
    return 1 if problems else 0


if __name__ == "__main__":
    raise SystemExit(main())
