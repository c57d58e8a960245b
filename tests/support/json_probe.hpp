// Reading one value out of a JSON document in a test, by JSON Pointer (RFC 6901), with
// simdjson: a missing member or a value of another type fails the test's expression with the
// pointer and the document in the message.
#pragma once

#include <simdjson.h>

#include <stdexcept>
#include <string>
#include <string_view>

namespace liveprob::test {

class JsonProbe {
public:
    explicit JsonProbe(const std::string& text) : text_(text) {
        if (parser_.parse(text_).get(doc_)) throw std::runtime_error("not JSON: " + text_);
    }
    simdjson::dom::element at(const std::string& pointer) const {
        simdjson::dom::element e;
        if (doc_.at_pointer(pointer).get(e))
            throw std::runtime_error("no " + pointer + " in " + text_);
        return e;
    }
    double number(const std::string& pointer) const {
        const auto e = at(pointer);
        if (e.is_double()) return e.get_double().value();
        if (e.is_uint64()) return static_cast<double>(e.get_uint64().value());
        if (e.is_int64()) return static_cast<double>(e.get_int64().value());
        throw std::runtime_error(pointer + " is not a number in " + text_);
    }
    std::string text(const std::string& pointer) const {
        std::string_view s;
        if (at(pointer).get(s)) throw std::runtime_error(pointer + " is not text in " + text_);
        return std::string(s);
    }
    bool flag(const std::string& pointer) const {
        bool b = false;
        if (at(pointer).get(b)) throw std::runtime_error(pointer + " is not a flag in " + text_);
        return b;
    }
    bool is_null(const std::string& pointer) const { return at(pointer).is_null(); }

private:
    std::string text_;
    simdjson::dom::parser parser_;
    simdjson::dom::element doc_;
};

}  // namespace liveprob::test
