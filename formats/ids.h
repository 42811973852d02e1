// Record identity and time stamps: random UUIDs and UTC times, the two things
// that let records from many tablets be merged later.
#pragma once
#include <string>
#include <string_view>

namespace cairn::formats {

// A random (version 4) UUID in its canonical lower-case 8-4-4-4-12 form
// (RFC 4122, section 4.4), from the operating system's random source.
std::string new_uuid();
// True for a canonical lower-case UUID of any version.
bool is_uuid(std::string_view s);

// The current UTC time as ISO 8601 with milliseconds: "2025-06-14T09:32:10.123Z".
// Text of this form sorts in time order.
std::string utc_now();

}  // namespace cairn::formats
