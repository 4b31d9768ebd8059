#include "core/objective/text_file.h"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <vector>

namespace sw {

std::string byteSizeText(std::uintmax_t bytes) {
    if (bytes >= (std::uintmax_t{1} << 30) && bytes % (std::uintmax_t{1} << 30) == 0)
        return std::to_string(bytes >> 30) + " GiB";
    if (bytes >= (std::uintmax_t{1} << 20) && bytes % (std::uintmax_t{1} << 20) == 0)
        return std::to_string(bytes >> 20) + " MiB";
    return std::to_string(bytes) + " bytes";
}

std::string readTextFile(const std::string& path, std::uintmax_t maxBytes) {
    namespace fs = std::filesystem;
    std::error_code ec;
    const fs::file_status status = fs::status(path, ec);
    if (ec || !fs::exists(status)) {
        if (ec && ec != std::errc::no_such_file_or_directory)
            throw TextFileError("cannot be opened (" + ec.message() + ")");
        throw TextFileError("does not exist");
    }
    if (fs::is_directory(status)) throw TextFileError("is a directory, not a file");
    if (fs::is_regular_file(status)) {
        const std::uintmax_t size = fs::file_size(path, ec);
        if (!ec && size > maxBytes)
            throw TextFileError("is " + std::to_string(size) + " bytes; the limit is " + byteSizeText(maxBytes));
    }
    errno = 0;
    std::ifstream in(path, std::ios::binary);
    if (!in) {
        const int error = errno;
        throw TextFileError("cannot be opened for reading" +
                            (error ? " (" + std::string(std::strerror(error)) + ")" : std::string()));
    }
    std::string text;
    std::vector<char> buffer(1 << 16);
    for (;;) {
        in.read(buffer.data(), static_cast<std::streamsize>(buffer.size()));
        const auto got = static_cast<std::size_t>(in.gcount());
        if (got == 0) break;
        if (text.size() + got > maxBytes)
            throw TextFileError("holds more than the limit of " + byteSizeText(maxBytes));
        if (const void* nul = std::memchr(buffer.data(), 0, got)) {
            text.append(buffer.data(), static_cast<const char*>(nul) - buffer.data() + 1);
            return text;
        }
        text.append(buffer.data(), got);
        if (!in) break;
    }
    if (in.bad()) throw TextFileError("could not be read");
    return text;
}

TextPlace placeOfByte(const std::string& text, std::size_t byte) {
    TextPlace place;
    for (std::size_t i = 0; i < byte && i < text.size(); ++i) {
        if (text[i] == '\n') {
            ++place.line;
            place.column = 1;
        } else if ((static_cast<unsigned char>(text[i]) & 0xC0) != 0x80) {
            ++place.column;
        }
    }
    return place;
}

}  // namespace sw
