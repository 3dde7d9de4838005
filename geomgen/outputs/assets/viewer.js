
(function () {
  "use strict";
  var holder = document.getElementById("view3d");
  var data = JSON.parse(document.getElementById("mesh-data").textContent);

  function decode(b64) {
    var s = atob(b64);
    var bytes = new Uint8Array(s.length);
    for (var i = 0; i < s.length; i++) bytes[i] = s.charCodeAt(i);
    return bytes.buffer;
  }

  function webglAvailable() {
    try {
      var probe = document.createElement("canvas");
      return !!(probe.getContext("webgl2") || probe.getContext("webgl"));
    } catch (e) {
      return false;
    }
  }

  if (!webglAvailable()) {
    holder.textContent = "This browser cannot show the 3D view: WebGL is not available.";
    holder.dataset.ready = "no-webgl";
    return;
  }

  var renderer = new THREE.WebGLRenderer({antialias: true, preserveDrawingBuffer: true});
  renderer.setPixelRatio(window.devicePixelRatio || 1);
  holder.appendChild(renderer.domElement);

  var scene = new THREE.Scene();
  scene.background = new THREE.Color(0xf4f6f9);
  var camera = new THREE.PerspectiveCamera(30, 1, 1, 1e6);
  camera.up.set(0, 0, 1);  // aircraft frame: z up
  scene.add(camera);
  scene.add(new THREE.HemisphereLight(0xffffff, 0x606870, 0.65));
  var lamp = new THREE.DirectionalLight(0xffffff, 0.55);
  lamp.position.set(-1, -1, 2);
  camera.add(lamp);  // the light turns with the view

  var meshes = {};
  var box = new THREE.Box3();
  data.parts.forEach(function (p) {
    var geometry = new THREE.BufferGeometry();
    geometry.setAttribute("position",
      new THREE.BufferAttribute(new Float32Array(decode(p.vertices)), 3));
    geometry.setIndex(new THREE.BufferAttribute(new Uint32Array(decode(p.triangles)), 1));
    geometry.computeBoundingBox();
    box.union(geometry.boundingBox);
    var material = new THREE.MeshPhongMaterial({
      color: new THREE.Color(p.colour), flatShading: true, side: THREE.DoubleSide,
      shininess: 20
    });
    var mesh = new THREE.Mesh(geometry, material);
    mesh.name = p.name;
    scene.add(mesh);
    meshes[p.name] = mesh;
  });

  var centre = box.getCenter(new THREE.Vector3());
  var radius = Math.max(box.getSize(new THREE.Vector3()).length() / 2, 1);
  camera.near = radius / 100;
  camera.far = radius * 100;

  var controls = new THREE.OrbitControls(camera, renderer.domElement);
  controls.minDistance = radius * 0.05;
  controls.maxDistance = radius * 20;

  function render() {
    renderer.render(scene, camera);
  }

  function resize() {
    var width = Math.max(holder.clientWidth, 200);
    var height = Math.max(Math.round(width * 0.55), 320);
    renderer.setSize(width, height);
    camera.aspect = width / height;
    camera.updateProjectionMatrix();
    render();
  }

  function home() {
    // from ahead, to the left and above: x aft, y right, z up
    var dir = new THREE.Vector3(-1.0, -1.25, 0.8).normalize();
    var distance = radius / Math.sin(THREE.MathUtils.degToRad(camera.fov / 2)) * 0.8;
    camera.position.copy(centre).addScaledVector(dir, distance);
    controls.target.copy(centre);
    controls.update();
    render();
  }

  controls.addEventListener("change", render);
  window.addEventListener("resize", resize);
  document.querySelectorAll("#part-toggles input[data-part]").forEach(function (box) {
    box.addEventListener("change", function () {
      var mesh = meshes[box.dataset.part];
      if (mesh) mesh.visible = box.checked;
      render();
    });
  });
  document.getElementById("view-reset").addEventListener("click", home);

  resize();
  home();
  holder.dataset.ready = "1";
})();
