# The touch UI's libraries: SDL2, OpenGL 3 and Debian's Dear ImGui 1.86, whose
# libimgui.a already holds the SDL2 and OpenGL3 backends; stb for PNG writing
# (Debian's libstb already holds stb_image_write's implementation); libgps for
# live positions from gpsd.
find_package(SDL2 REQUIRED)
find_package(OpenGL REQUIRED)
pkg_check_modules(IMGUI REQUIRED IMPORTED_TARGET imgui)
pkg_check_modules(STB REQUIRED IMPORTED_TARGET stb)
pkg_check_modules(LIBGPS REQUIRED IMPORTED_TARGET libgps)
target_link_libraries(cairn PRIVATE ${SDL2_LIBRARIES} OpenGL::GL PkgConfig::IMGUI PkgConfig::STB PkgConfig::LIBGPS ${CMAKE_DL_LIBS})
target_include_directories(cairn PRIVATE ${SDL2_INCLUDE_DIRS})
target_compile_definitions(cairn PRIVATE CAIRN_WITH_UI=1)
