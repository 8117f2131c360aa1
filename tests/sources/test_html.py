"""HTML to text with the standard library's html.parser (HTML5 named character references)."""

from __future__ import annotations

from seedsort.sources._html import html_to_text


def test_script_and_style_are_dropped_and_blocks_become_lines() -> None:
    markup = (
        "<html><head><style>p { color: red }</style></head><body>"
        "<h1>Order  problem</h1><script>var x = '<p>not text</p>';</script>"
        "<p>The parcel arrived <b>damaged</b>.</p><div>Please refund.</div>"
        "</body></html>"
    )
    assert html_to_text(markup) == "Order problem\nThe parcel arrived damaged.\nPlease refund."


def test_entities_are_unescaped() -> None:
    assert html_to_text("<p>Fish &amp; chips &lt;3 &eacute;t&eacute; &#8364;5</p>") == (
        "Fish & chips <3 été €5"
    )


def test_br_list_items_and_table_cells() -> None:
    markup = "a<br>b<br/>c<ul><li>one</li><li>two</li></ul><table><tr><td>x</td><td>y</td></tr></table>"
    assert html_to_text(markup) == "a\nb\nc\none\ntwo\nx y"


def test_pre_keeps_its_whitespace() -> None:
    assert html_to_text("<p>log:</p><pre>  line 1\n    line 2</pre>") == "log:\n  line 1\n    line 2"


def test_blank_lines_are_capped_and_outer_space_stripped() -> None:
    assert html_to_text("<p> </p><p>a</p><br><br><br><br><p>b</p>\n\n") == "a\n\nb"


def test_malformed_declaration_falls_back_to_tag_stripping() -> None:
    # html.parser raises AssertionError on an unknown marked section such as "<![foo[".
    assert html_to_text("<![foo[ x ]]><p>still &amp; here</p>") == "still & here"


def test_unclosed_tags_and_stray_end_tags_do_not_lose_text() -> None:
    assert html_to_text("</div></script><p>first<p>second") == "first\nsecond"
