/* Start Swagger UI on /docs; changes tried from the page carry the session's CSRF token. */
(function () {
  "use strict";
  var meta = document.querySelector('meta[name="csrf-token"]');
  window.addEventListener("load", function () {
    window.SwaggerUIBundle({
      url: "/openapi.json",
      dom_id: "#swagger-ui",
      deepLinking: true,
      presets: [window.SwaggerUIBundle.presets.apis],
      layout: "BaseLayout",
      requestInterceptor: function (request) {
        if (meta && !/^(GET|HEAD|OPTIONS)$/i.test(request.method || "GET")) {
          request.headers["X-CSRF-Token"] = meta.getAttribute("content");
        }
        return request;
      },
    });
  });
})();
