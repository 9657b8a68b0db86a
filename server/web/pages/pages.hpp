// The dashboard's page handlers, one file per page (pages/*.cpp).
#pragma once

#include "server/web/page.hpp"

namespace pbfleet::web::pages {

http::Response sign_in_form(const PageCall& call);
http::Response sign_in(const PageCall& call);
http::Response sign_out(const PageCall& call);
http::Response winter(const PageCall& call);
http::Response batteries(const PageCall& call);
http::Response battery(const PageCall& call);
http::Response trends(const PageCall& call);
http::Response overdue(const PageCall& call);
http::Response reading_form(const PageCall& call);
http::Response reading_submit(const PageCall& call);

}  // namespace pbfleet::web::pages
