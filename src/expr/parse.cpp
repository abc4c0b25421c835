// Lexer and precedence-climbing parser for model expressions.
//
// Grammar (lowest precedence first):
//   sum     := product (('+' | '-') product)*
//   product := unary (('*' | '/') unary)*
//   unary   := ('-' | '+') unary | power
//   power   := primary ('^' unary)?          right-associative: 2^3^2 = 2^(3^2), 2^-1 allowed
//   primary := number | identifier | identifier '(' sum ')' | '(' sum ')'
// so -x^2 = -(x^2) and -a*b = (-a)*b.
//
// Recursion happens only where nesting grows (parentheses, calls, signs, exponents) and is bounded by a depth
// limit; sums and products are loops. The number of terms is capped so that the recursive tree walks in
// analyze.cpp stay shallow as well.
#include <algorithm>
#include <cctype>
#include <charconv>
#include <cstdio>
#include <optional>
#include <string>
#include <system_error>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "ops/table.hpp"

namespace plateau::expr {

namespace {

constexpr int kMaxDepth = units::kMaxNesting;
constexpr std::size_t kMaxTerms = 10000;

const char* const kExpectValue = "a number, an identifier or '('";
const char* const kExpectOperator = "an operator (+ - * / ^) or the end of the expression";
const char* const kExpectNumber =
    "a number such as 1, 1.5, .5, 1e-3 or 2.5E+4; put '*' between a number and a name";

enum class Tok { End, Num, Ident, Plus, Minus, Star, Slash, Caret, LParen, RParen, Comma };

struct Token {
    Tok kind = Tok::End;
    std::size_t begin = 0;
    std::size_t end = 0;
    double num = 0.0;
};

bool is_ident_start(char c) { return std::isalpha(static_cast<unsigned char>(c)) != 0 || c == '_'; }
bool is_ident_char(char c) { return std::isalnum(static_cast<unsigned char>(c)) != 0 || c == '_'; }
bool is_digit(char c) { return c >= '0' && c <= '9'; }
bool is_space(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r'; }

// Functions whose graph has a kink or a jump: a Taylor series cannot follow them across it.
bool is_kink_function(std::string_view name) {
    std::string lower(name);
    for (char& c : lower) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    static const char* const names[] = {"min",  "max",       "abs",  "fabs",   "floor",     "ceil",
                                        "round", "trunc",    "int",  "sign",   "sgn",       "step",
                                        "heaviside", "if",   "ifelse", "piecewise", "mod", "fmod",
                                        "rem",  "clamp"};
    return std::any_of(std::begin(names), std::end(names), [&](const char* n) { return lower == n; });
}

// Length in bytes of the character starting at text[i] (a whole UTF-8 sequence if it is one).
std::size_t char_length(std::string_view text, std::size_t i) {
    const auto c = static_cast<unsigned char>(text[i]);
    std::size_t n = 1;
    if (c >= 0xF0) n = 4;
    else if (c >= 0xE0) n = 3;
    else if (c >= 0xC0) n = 2;
    n = std::min(n, text.size() - i);
    for (std::size_t k = 1; k < n; ++k)
        if ((static_cast<unsigned char>(text[i + k]) & 0xC0) != 0x80) return 1;
    return n;
}

// A character as it should appear in a message: printable text as is, control bytes as \xNN.
std::string show_char(std::string_view text, std::size_t i, std::size_t n) {
    const auto c = static_cast<unsigned char>(text[i]);
    if (n == 1 && (c < 0x20 || c >= 0x7F)) {
        char buf[8];
        std::snprintf(buf, sizeof buf, "\\x%02X", static_cast<unsigned>(c));
        return buf;
    }
    return std::string(text.substr(i, n));
}

// The outer extent of a parsed piece: the node plus any parentheses or unary '+' around it.
struct Parsed {
    Ptr node;
    std::size_t begin = 0;
    std::size_t end = 0;
};

class Parser {
public:
    explicit Parser(std::string_view text) : text_(text) { advance(); }

    Ptr run() {
        if (tok_.kind == Tok::End) throw TextError("empty expression", 0, 1, "an expression such as 'cl/v*central'");
        Parsed p = parse_sum();
        if (tok_.kind == Tok::RParen) throw TextError("unmatched ')'", tok_.begin, 1, kExpectOperator);
        if (tok_.kind != Tok::End)
            throw TextError("unexpected '" + tok_text() + "' after a complete expression", tok_.begin,
                            tok_.end - tok_.begin, kExpectOperator);
        return p.node;
    }

private:
    std::string_view text_;
    std::size_t pos_ = 0;  // next unread byte
    Token tok_;            // current token
    Tok prev_ = Tok::End;  // kind of the token before tok_
    int depth_ = 0;
    std::size_t terms_ = 0;

    // ---- lexer ----

    std::string tok_text() const { return std::string(text_.substr(tok_.begin, tok_.end - tok_.begin)); }

    void advance() {
        prev_ = tok_.kind;
        while (pos_ < text_.size() && is_space(text_[pos_])) ++pos_;
        tok_ = Token{};
        tok_.begin = pos_;
        if (pos_ >= text_.size()) {
            tok_.kind = Tok::End;
            tok_.end = pos_;
            return;
        }
        const char c = text_[pos_];
        if (is_digit(c) || c == '.') {
            lex_number();
            return;
        }
        if (is_ident_start(c)) {
            while (pos_ < text_.size() && is_ident_char(text_[pos_])) ++pos_;
            tok_.kind = Tok::Ident;
            tok_.end = pos_;
            return;
        }
        Tok k = Tok::End;
        switch (c) {
            case '+': k = Tok::Plus; break;
            case '-': k = Tok::Minus; break;
            case '*': k = Tok::Star; break;
            case '/': k = Tok::Slash; break;
            case '^': k = Tok::Caret; break;
            case '(': k = Tok::LParen; break;
            case ')': k = Tok::RParen; break;
            case ',': k = Tok::Comma; break;
            default: {
                const std::size_t n = char_length(text_, pos_);
                std::string expected = "a number, an identifier, an operator (+ - * / ^) or parentheses";
                if (c == '<' || c == '>' || c == '=' || c == '!' || c == '?' || c == '&' || c == '|')
                    expected += "; comparisons and conditions are not allowed: a Taylor series cannot follow a jump";
                throw TextError("unexpected character '" + show_char(text_, pos_, n) + "'", pos_, n, expected);
            }
        }
        ++pos_;
        tok_.kind = k;
        tok_.end = pos_;
    }

    // digits [ '.' digits ] [ ('e'|'E') ['+'|'-'] digits ], or '.' digits [exponent].
    void lex_number() {
        const std::size_t start = pos_;
        bool ok = true;
        std::size_t digits = 0;
        while (pos_ < text_.size() && is_digit(text_[pos_])) ++pos_, ++digits;
        if (pos_ < text_.size() && text_[pos_] == '.') {
            ++pos_;
            while (pos_ < text_.size() && is_digit(text_[pos_])) ++pos_, ++digits;
        }
        if (digits == 0) ok = false;
        if (ok && pos_ < text_.size() && (text_[pos_] == 'e' || text_[pos_] == 'E')) {
            ++pos_;
            if (pos_ < text_.size() && (text_[pos_] == '+' || text_[pos_] == '-')) ++pos_;
            std::size_t exp_digits = 0;
            while (pos_ < text_.size() && is_digit(text_[pos_])) ++pos_, ++exp_digits;
            if (exp_digits == 0) ok = false;
        }
        // A number glued to letters, digits or another '.' ("2x", "1.2.3", "3h", "1e") is one bad token.
        if (!ok || (pos_ < text_.size() && (is_ident_char(text_[pos_]) || text_[pos_] == '.'))) {
            while (pos_ < text_.size() && (is_ident_char(text_[pos_]) || text_[pos_] == '.')) ++pos_;
            throw TextError("malformed number '" + std::string(text_.substr(start, pos_ - start)) + "'", start,
                            pos_ - start, kExpectNumber);
        }
        const std::string_view s = text_.substr(start, pos_ - start);
        double v = 0.0;
        const auto [ptr, ec] = std::from_chars(s.data(), s.data() + s.size(), v, std::chars_format::general);
        if (ec == std::errc::result_out_of_range)
            throw TextError("number '" + std::string(s) + "' is out of range", start, s.size(),
                            "a number between 1e-307 and 1e308 in size");
        if (ec != std::errc() || ptr != s.data() + s.size())
            throw TextError("malformed number '" + std::string(s) + "'", start, s.size(), kExpectNumber);
        tok_.kind = Tok::Num;
        tok_.num = v;
        tok_.end = pos_;
    }

    // ---- helpers ----

    struct DepthGuard {
        int& depth;
        DepthGuard(int& d, std::size_t offset) : depth(d) {
            if (++depth > kMaxDepth) {
                throw TextError("expression nested too deeply (more than " + std::to_string(kMaxDepth) + " levels)",
                                offset, 1,
                                "at most " + std::to_string(kMaxDepth) + " levels of parentheses, signs or powers");
            }
        }
        ~DepthGuard() { --depth; }
        DepthGuard(const DepthGuard&) = delete;
        DepthGuard& operator=(const DepthGuard&) = delete;
    };

    static Parsed make(Op op, Ptr a, Ptr b, std::size_t begin, std::size_t end) {
        auto n = std::make_shared<Node>();
        n->op = op;
        n->a = std::move(a);
        n->b = std::move(b);
        n->begin = begin;
        n->end = end;
        return Parsed{std::move(n), begin, end};
    }

    void count_term(std::size_t offset, std::size_t length) {
        if (++terms_ > kMaxTerms)
            throw TextError("expression too long (more than " + std::to_string(kMaxTerms) + " terms)", offset, length,
                            "a shorter expression");
    }

    [[noreturn]] void fail_value() const {
        if (tok_.kind == Tok::End) {
            throw TextError("unexpected end of expression", tok_.begin, 1, kExpectValue);
        }
        std::string expected = kExpectValue;
        if (tok_.kind == Tok::Star && prev_ == Tok::Star) expected += " (write a power as x^y)";
        throw TextError("unexpected '" + tok_text() + "'", tok_.begin, tok_.end - tok_.begin, expected);
    }

    void expect_close(const char* expected) {
        if (tok_.kind != Tok::RParen) {
            const std::size_t len = tok_.kind == Tok::End ? 1 : tok_.end - tok_.begin;
            throw TextError("missing ')'", tok_.begin, len, expected);
        }
    }

    // ---- grammar ----

    Parsed parse_sum() {
        Parsed left = parse_product();
        while (tok_.kind == Tok::Plus || tok_.kind == Tok::Minus) {
            const Op op = tok_.kind == Tok::Plus ? Op::Add : Op::Sub;
            advance();
            Parsed right = parse_product();
            left = make(op, std::move(left.node), std::move(right.node), left.begin, right.end);
        }
        return left;
    }

    Parsed parse_product() {
        Parsed left = parse_unary();
        while (tok_.kind == Tok::Star || tok_.kind == Tok::Slash) {
            const Op op = tok_.kind == Tok::Star ? Op::Mul : Op::Div;
            advance();
            Parsed right = parse_unary();
            left = make(op, std::move(left.node), std::move(right.node), left.begin, right.end);
        }
        return left;
    }

    Parsed parse_unary() {
        if (tok_.kind == Tok::Minus || tok_.kind == Tok::Plus) {
            const bool minus = tok_.kind == Tok::Minus;
            const std::size_t begin = tok_.begin;
            DepthGuard guard(depth_, begin);
            advance();
            Parsed operand = parse_unary();
            if (!minus) return Parsed{std::move(operand.node), begin, operand.end};
            return make(Op::Neg, std::move(operand.node), nullptr, begin, operand.end);
        }
        return parse_power();
    }

    Parsed parse_power() {
        Parsed base = parse_primary();
        if (tok_.kind != Tok::Caret) return base;
        DepthGuard guard(depth_, tok_.begin);
        advance();
        Parsed exponent = parse_unary();
        return make(Op::Pow, std::move(base.node), std::move(exponent.node), base.begin, exponent.end);
    }

    Parsed parse_primary() {
        switch (tok_.kind) {
            case Tok::Num: {
                count_term(tok_.begin, tok_.end - tok_.begin);
                auto n = std::make_shared<Node>();
                n->op = Op::Num;
                n->num = tok_.num;
                n->begin = tok_.begin;
                n->end = tok_.end;
                const std::size_t begin = n->begin, end = n->end;
                advance();
                return Parsed{std::move(n), begin, end};
            }
            case Tok::Ident: {
                const Token name = tok_;
                advance();
                if (tok_.kind == Tok::LParen) return parse_call(name);
                count_term(name.begin, name.end - name.begin);
                auto n = std::make_shared<Node>();
                n->op = Op::Var;
                n->name = std::string(text_.substr(name.begin, name.end - name.begin));
                n->begin = name.begin;
                n->end = name.end;
                return Parsed{std::move(n), name.begin, name.end};
            }
            case Tok::LParen: {
                const std::size_t open = tok_.begin;
                DepthGuard guard(depth_, open);
                advance();
                Parsed inner = parse_sum();
                expect_close("')' or an operator (+ - * / ^)");
                const std::size_t close = tok_.end;
                advance();
                return Parsed{std::move(inner.node), open, close};
            }
            default: fail_value();
        }
    }

    // `name` is the identifier; the current token is '('.
    Parsed parse_call(const Token& name) {
        const std::string fn(text_.substr(name.begin, name.end - name.begin));
        const std::size_t name_len = name.end - name.begin;
        const std::optional<Op> found = ops::function_named(fn);
        if (!found && is_kink_function(fn))
            throw TextError("function '" + fn +
                                "' is not allowed: a Taylor series cannot follow a kink or a jump; use a smooth "
                                "expression",
                            name.begin, name_len, ops::function_phrase());
        if (!found) throw TextError("unknown function '" + fn + "'", name.begin, name_len, ops::function_phrase());
        const Op op = *found;

        DepthGuard guard(depth_, tok_.begin);
        advance();  // '('
        std::vector<Parsed> args;
        if (tok_.kind != Tok::RParen) {
            args.push_back(parse_sum());
            while (tok_.kind == Tok::Comma) {
                advance();
                args.push_back(parse_sum());
            }
            expect_close("')' or an operator (+ - * / ^)");
        }
        const std::size_t end = tok_.end;
        if (args.size() != 1)
            throw TextError("'" + fn + "' takes exactly one argument, got " + std::to_string(args.size()), name.begin,
                            end - name.begin, fn + "(x)");
        advance();  // ')'
        return make(op, std::move(args.front().node), nullptr, name.begin, end);
    }
};

}  // namespace

Ptr parse(std::string_view text) { return Parser(text).run(); }

Node::~Node() {
    // A long sum is a left-deep chain: freeing it node by node through nested destructors would recurse once per
    // term. Children only this node owns are detached first and freed from a list instead.
    std::vector<Ptr> orphans;
    auto take = [&](Ptr& p) {
        if (p && p.use_count() == 1) orphans.push_back(std::move(p));
    };
    take(a);
    take(b);
    while (!orphans.empty()) {
        Ptr p = std::move(orphans.back());
        orphans.pop_back();
        if (p.use_count() == 1) {
            // Every node is made non-const by make_shared<Node>() and only viewed as const, so this is allowed.
            Node& n = const_cast<Node&>(*p);
            take(n.a);
            take(n.b);
        }
    }
}

}  // namespace plateau::expr
