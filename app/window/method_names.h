#pragma once
// Names of the methods as people say them ("Trust region, dogleg"), for menus and lists that
// also show the id (the id is what study files and the command line use). A method without an
// entry here gets its id in words, so a newly registered method still reads.

#include <QString>
#include <string>

namespace sw::window {

QString methodDisplayName(const std::string& id);

}  // namespace sw::window
