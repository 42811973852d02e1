// Base64 encoding (formats/base64.h).
// Source: the test vectors of RFC 4648, section 10, and Python's base64 module
// (Debian's /usr/bin/python3) for a binary string.
#include <gtest/gtest.h>

#include <cstdio>
#include <memory>

#include "formats/base64.h"

using cairn::formats::base64_encode;

TEST(Base64, Rfc4648Vectors) {
  EXPECT_EQ(base64_encode(""), "");
  EXPECT_EQ(base64_encode("f"), "Zg==");
  EXPECT_EQ(base64_encode("fo"), "Zm8=");
  EXPECT_EQ(base64_encode("foo"), "Zm9v");
  EXPECT_EQ(base64_encode("foob"), "Zm9vYg==");
  EXPECT_EQ(base64_encode("fooba"), "Zm9vYmE=");
  EXPECT_EQ(base64_encode("foobar"), "Zm9vYmFy");
}

TEST(Base64, EveryByteAsPythonEncodesIt) {
  std::string all;
  for (int i = 0; i < 256; ++i) all += static_cast<char>(255 - i);
  std::unique_ptr<FILE, int (*)(FILE*)> p(
      popen("/usr/bin/python3 -c \"import base64,sys; "
            "sys.stdout.write(base64.b64encode(bytes(range(255,-1,-1))).decode())\"",
            "r"),
      pclose);
  ASSERT_TRUE(p);
  std::string expected;
  char buf[512];
  while (fgets(buf, sizeof buf, p.get())) expected += buf;
  ASSERT_FALSE(expected.empty());
  EXPECT_EQ(base64_encode(all), expected);
}
