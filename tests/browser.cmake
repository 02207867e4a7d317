# The HTML report in a real browser (label `browser`): report.browser builds
# tests/browser/write_report.cpp (a seeded scenario drawn with every section and figure of
# heldout::report::html_report), and tests/browser/check_report.py loads the page in headless
# chromium and fails when the page logs an error or a figure does not render (see
# docs/report.md). SKIPPED (exit 77) only when chromium is absent outside CI; .ci/run and
# `bash cmake/setup.sh test` install it.
set(browser_sources ${CMAKE_CURRENT_SOURCE_DIR}/browser/write_report.cpp)
heldout_only(browser_sources)
if(browser_sources)
    add_executable(heldout_report_page ${browser_sources})
    target_link_libraries(heldout_report_page PRIVATE heldout::heldout)
    target_include_directories(heldout_report_page PRIVATE ${CMAKE_CURRENT_SOURCE_DIR}) # support/
    heldout_dev_target(heldout_report_page)
    add_test(NAME report.browser
             COMMAND ${HELDOUT_PYTHON} ${CMAKE_CURRENT_SOURCE_DIR}/browser/check_report.py
                     $<TARGET_FILE:heldout_report_page> ${CMAKE_CURRENT_BINARY_DIR}/browser)
    set_tests_properties(report.browser PROPERTIES LABELS browser SKIP_RETURN_CODE 77 TIMEOUT 600)
endif()
