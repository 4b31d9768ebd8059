// Data files of fit studies: where they are, and whether they are still the file the study
// was saved with (SHA-256, FIPS 180-4, through OpenSSL's EVP interface).
#include "core/study/study.h"

#include "core/objective/text_file.h"

#include <openssl/evp.h>

#include <filesystem>
#include <fstream>
#include <memory>

namespace sw::study {

namespace fs = std::filesystem;

std::string directoryOf(const std::string& studyPath) {
    const fs::path parent = fs::path(studyPath).parent_path();
    return parent.empty() ? std::string(".") : parent.string();
}

// A study's data must be a regular file of at most kMaxTableBytes: its checksum names one
// fixed file, and a device such as /dev/zero would never end.
void checkDataFile(const std::string& path, const std::string& shownPath) {
    std::error_code ec;
    const fs::file_status status = fs::status(path, ec);
    if (fs::is_directory(status))
        throw StudyError("objective.data", "'" + shownPath + "' is a directory; give the data file (a CSV table)");
    if (fs::exists(status) && !fs::is_regular_file(status))
        throw StudyError("objective.data", "'" + shownPath +
                                               "' is not a regular file (a study's data must be a file, so that its "
                                               "checksum names fixed contents)");
    const std::uintmax_t size = fs::file_size(path, ec);
    if (!ec && size > kMaxTableBytes)
        throw StudyError("objective.data", "'" + shownPath + "' is " + std::to_string(size) + " bytes; the limit is " +
                                               byteSizeText(kMaxTableBytes));
}

std::string fileChecksum(const std::string& path) {
    checkDataFile(path, path);
    std::ifstream in(path, std::ios::binary);
    if (!in) throw StudyError("file", "cannot open '" + path + "' to compute its checksum");
    std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)> context(EVP_MD_CTX_new(), &EVP_MD_CTX_free);
    if (!context || EVP_DigestInit_ex(context.get(), EVP_sha256(), nullptr) != 1)
        throw StudyError("file", "SHA-256 is not available from OpenSSL");
    std::vector<char> buffer(1 << 16);
    while (in) {
        in.read(buffer.data(), static_cast<std::streamsize>(buffer.size()));
        const std::streamsize got = in.gcount();
        if (got > 0 && EVP_DigestUpdate(context.get(), buffer.data(), static_cast<std::size_t>(got)) != 1)
            throw StudyError("file", "SHA-256 of '" + path + "' failed");
    }
    if (in.bad()) throw StudyError("file", "cannot read '" + path + "'");
    unsigned char digest[EVP_MAX_MD_SIZE];
    unsigned int length = 0;
    if (EVP_DigestFinal_ex(context.get(), digest, &length) != 1)
        throw StudyError("file", "SHA-256 of '" + path + "' failed");
    static const char* hex = "0123456789abcdef";
    std::string text = "sha256:";
    for (unsigned int i = 0; i < length; ++i) {
        text += hex[digest[i] >> 4];
        text += hex[digest[i] & 15];
    }
    return text;
}

std::string resolveDataPath(const std::string& dataPath, const std::string& baseDirectory) {
    const fs::path data(dataPath);
    if (data.is_absolute() || baseDirectory.empty()) return data.lexically_normal().string();
    return (fs::path(baseDirectory) / data).lexically_normal().string();
}

void refreshChecksum(Study& study, const std::string& baseDirectory) {
    if (!study.fit) return;
    study.fit->checksum = fileChecksum(resolveDataPath(study.fit->dataPath, baseDirectory));
}

void rebaseDataPath(Study& study, const std::string& fromDirectory, const std::string& toDirectory) {
    if (!study.fit) return;
    const fs::path data(study.fit->dataPath);
    if (data.is_absolute()) return;
    const fs::path absoluteData = fs::absolute(fs::path(fromDirectory) / data).lexically_normal();
    const fs::path relative = absoluteData.lexically_relative(fs::absolute(toDirectory).lexically_normal());
    // Different roots give no relative path: keep the absolute one.
    study.fit->dataPath = relative.empty() ? absoluteData.generic_string() : relative.generic_string();
}

}  // namespace sw::study
